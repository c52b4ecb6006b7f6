import { NextResponse, type NextRequest } from "next/server";
import { readSessionToken } from "@/lib/auth/session-token";

/**
 * First gate for pages only: no session means a redirect to sign-in. The real checks, role by
 * trial, happen on the server in lib/auth for every page, route and action. Route handlers under
 * /api do not pass through here: each calls lib/auth before it reads anything (401 without a
 * session), and lib/http's handle() refuses cross-site writes, so the proxy would only repeat
 * that work on the busiest path.
 */
const PUBLIC = [/^\/signin$/, /^\/set-password$/, /^\/_next\//, /^\/favicon/, /^\/icon/];

export async function proxy(req: NextRequest) {
  const { pathname } = req.nextUrl;
  if (PUBLIC.some((p) => p.test(pathname))) return NextResponse.next();
  const token = await readSessionToken(req);
  if (token) return NextResponse.next();
  const url = req.nextUrl.clone();
  url.pathname = "/signin";
  url.search = "";
  return NextResponse.redirect(url);
}

export const config = { matcher: ["/((?!api/|_next/static|_next/image|favicon.ico).*)"] };
