import { NextResponse, type NextRequest } from "next/server";
import { getToken } from "next-auth/jwt";

/**
 * First gate only: no session means a redirect to sign-in (pages) or 401 (API). The real checks,
 * role by trial, happen on the server in lib/auth for every page, route and action.
 */
const PUBLIC = [/^\/signin$/, /^\/api\/auth\//, /^\/api\/health$/, /^\/_next\//, /^\/favicon/, /^\/icon/];

export async function proxy(req: NextRequest) {
  const { pathname } = req.nextUrl;
  if (isCrossSiteWrite(req)) return NextResponse.json({ error: "Cross-site requests may not change data." }, { status: 403 });
  if (PUBLIC.some((p) => p.test(pathname))) return NextResponse.next();
  const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET });
  if (token) return NextResponse.next();
  if (pathname.startsWith("/api/")) return NextResponse.json({ error: "Sign in to continue." }, { status: 401 });
  const url = req.nextUrl.clone();
  url.pathname = "/signin";
  url.search = "";
  return NextResponse.redirect(url);
}

/**
 * CSRF defence for the JSON API: a state-changing request that carries an Origin (every browser
 * sends one on cross-site POST, PUT, PATCH and DELETE) must come from this site. Server actions
 * get the same check from Next itself; next-auth's own routes use its CSRF token.
 */
function isCrossSiteWrite(req: NextRequest): boolean {
  if (["GET", "HEAD", "OPTIONS"].includes(req.method)) return false;
  if (!req.nextUrl.pathname.startsWith("/api/") || req.nextUrl.pathname.startsWith("/api/auth/")) return false;
  const origin = req.headers.get("origin");
  if (!origin) return false;
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host");
  try {
    return new URL(origin).host !== host;
  } catch {
    return true;
  }
}

export const config = { matcher: ["/((?!_next/static|_next/image|favicon.ico).*)"] };
