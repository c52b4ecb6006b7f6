/**
 * Where sign-in sends a person back to: the page they asked for while signed out (a link in an
 * e-mail, a bookmark). The target travels in the sign-in URL (?callbackUrl=...), so anyone can put
 * anything there; only a path on this site is accepted, never another host (an open redirect would
 * let a phishing mail borrow Cairn's address). Pure, no imports: the proxy, the sign-in page and the
 * sign-in form all use it.
 */

/** The page a signed-in person lands on when no (acceptable) target is given. */
export const DEFAULT_RETURN_TO = "/trials";

const PLACEHOLDER_ORIGIN = "http://cairn.invalid";

/**
 * The target as a same-site relative path ("/trials/3/meetings/7?x=1#packets"), or null when it is
 * not one. Refused: anything not starting with a single "/", "//host" and "/\host" (browsers read
 * both as another host), any backslash, whitespace or control character (browsers drop tabs and
 * newlines, so "/\t/evil" becomes "//evil"), schemes ("https:", "javascript:"), sign-in itself
 * (a loop) and the API (not a page). Percent-encoded slashes stay encoded, so they stay on this site.
 */
export function safeReturnTo(raw: unknown): string | null {
  if (typeof raw !== "string" || raw.length === 0 || raw.length > 2000) return null;
  if (!raw.startsWith("/") || raw.startsWith("//")) return null;
  if (/[\\\s\u0000-\u001f\u007f]/.test(raw)) return null;
  let url: URL;
  try {
    url = new URL(raw, PLACEHOLDER_ORIGIN);
  } catch {
    return null;
  }
  if (url.origin !== PLACEHOLDER_ORIGIN) return null;
  const path = url.pathname;
  if (path === "/signin" || path.startsWith("/signin/") || path === "/api" || path.startsWith("/api/")) return null;
  // Dot segments collapse: "/.//evil" normalises to "//evil", which a browser reads as a host.
  const out = path + url.search + url.hash;
  if (out.startsWith("//") || out.includes("\\")) return null;
  return out;
}

/**
 * The request header in which the proxy hands a page request's own path and query to the server
 * (a page finding the session gone sends the person to sign-in with it as the return target). The
 * proxy overwrites whatever the browser sent; the value is still sanitised on use.
 */
export const PAGE_PATH_HEADER = "x-cairn-page";

/** The sign-in URL for a page whose session is gone: back to the page (from PAGE_PATH_HEADER) when that is a safe target. */
export function signInPathForPage(pagePath: string | null | undefined): string {
  return signInPathFor(pagePath ?? "");
}

/** The sign-in URL that returns to `target` afterwards (no parameter for the default landing page). */
export function signInPathFor(target: string): string {
  const safe = safeReturnTo(target);
  if (!safe || safe === "/" || safe === DEFAULT_RETURN_TO) return "/signin";
  return `/signin?callbackUrl=${encodeURIComponent(safe)}`;
}
