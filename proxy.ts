import { NextResponse, type NextRequest } from "next/server";
import { readSessionToken } from "@/lib/auth/session-token";
import { NO_STORE, newCspNonce, pageContentSecurityPolicy } from "@/lib/security-headers";
import { PAGE_PATH_HEADER, signInPathFor } from "@/lib/auth/return-to";

/**
 * First gate for pages only: no session means a redirect to sign-in. The real checks, role by
 * trial, happen on the server in lib/auth for every page, route and action. Route handlers under
 * /api do not pass through here: each calls lib/auth before it reads anything (401 without a
 * session), and lib/http's handle() refuses cross-site writes, so the proxy would only repeat
 * that work on the busiest path (their CSP and no-store come from next.config.mjs and handle()).
 *
 * Every page answer gets a per-request nonce CSP (Next.js reads the nonce from the request's CSP
 * header and puts it on its scripts; the root layout renders every page per request so the nonce
 * is always fresh) and Cache-Control: no-store, since a page may show closed data.
 */
const PUBLIC = [/^\/signin$/, /^\/set-password$/, /^\/_next\//, /^\/favicon/, /^\/icon/];

function withPolicy(res: NextResponse, csp: string): NextResponse {
  res.headers.set("Content-Security-Policy", csp);
  res.headers.set("Cache-Control", NO_STORE);
  return res;
}

export async function proxy(req: NextRequest) {
  const { pathname } = req.nextUrl;
  const csp = pageContentSecurityPolicy(newCspNonce(), { dev: process.env.NODE_ENV === "development" });
  const next = () => {
    const headers = new Headers(req.headers);
    headers.set("Content-Security-Policy", csp);
    // The page's own path, so a page that finds the session gone can send sign-in back to it.
    headers.set(PAGE_PATH_HEADER, pathname + req.nextUrl.search);
    return withPolicy(NextResponse.next({ request: { headers } }), csp);
  };
  if (PUBLIC.some((p) => p.test(pathname))) return next();
  const token = await readSessionToken(req);
  if (token) return next();
  // The page asked for rides along (validated again on arrival), so sign-in returns to it.
  const url = req.nextUrl.clone();
  const target = new URL(signInPathFor(pathname + req.nextUrl.search), url);
  url.pathname = target.pathname;
  url.search = target.search;
  return withPolicy(NextResponse.redirect(url), csp);
}

export const config = { matcher: ["/((?!api/|_next/static|_next/image|favicon.ico).*)"] };
