/**
 * Content Security Policy for pages, with a fresh nonce per request (set by proxy.ts, which
 * passes it to Next.js in the request's own CSP header so the framework's scripts carry it).
 * Pure and runtime-neutral (Web Crypto only), so proxy.ts and the tests share it.
 *
 * Scripts: only those carrying this request's nonce, and what they load ('strict-dynamic', so the
 * lazily loaded chart and grid chunks run without listing each one); no 'unsafe-inline', and no
 * 'unsafe-eval' except under `next dev` (React's development build reconstructs server stacks
 * with eval). Styles keep 'unsafe-inline': Plotly sets inline style attributes and injects
 * <style> rules at run time without a nonce, and a nonce in style-src would switch
 * 'unsafe-inline' off. A style cannot run code, so this leaves script injection closed.
 */
export function pageContentSecurityPolicy(nonce: string, opts: { dev: boolean }): string {
  if (!/^[A-Za-z0-9+/=_-]{16,}$/.test(nonce)) throw new Error("A CSP nonce must be at least 16 base64 characters.");
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${opts.dev ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    "connect-src 'self'",
    "frame-ancestors 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "object-src 'none'",
  ].join("; ");
}

/**
 * Route handlers answer JSON, PDF or .eml and never need to run anything: nothing may load, and a
 * response opened directly in a tab is sandboxed. Kept equal to the value in next.config.mjs
 * (which cannot import TypeScript); tests/e2e/headers.spec.ts checks the served header.
 */
export const API_CONTENT_SECURITY_POLICY = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'; sandbox";

/** 128 random bits, base64: unguessable and unique per response. */
export function newCspNonce(): string {
  const bytes = new Uint8Array(16);
  crypto.getRandomValues(bytes);
  let s = "";
  for (const b of bytes) s += String.fromCharCode(b);
  return btoa(s);
}

/** Every authenticated answer may hold closed data: no browser or proxy may keep a copy. */
export const NO_STORE = "no-store";
