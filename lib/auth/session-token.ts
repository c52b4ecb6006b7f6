/**
 * Reads the next-auth session cookie. Decrypting the JWE costs a key derivation and an AES-GCM
 * pass; the proxy and lib/auth read the cookie on every page request, so a token that decrypted
 * once is remembered until it expires. Only genuine tokens get in (a forged or tampered one fails
 * decryption and is never cached), and the cache holds no more than MAX_TOKENS entries.
 * Shared by proxy.ts and lib/auth; no database and no "server-only" so the proxy can use it.
 */
import { decode, getToken, type JWT } from "next-auth/jwt";

const MAX_TOKENS = 5_000;
const verified = new Map<string, { payload: JWT; expiresAtMs: number }>();

export async function decodeSessionToken(params: { token?: string; secret: string | Buffer }): Promise<JWT | null> {
  const { token, secret } = params;
  if (!token) return null;
  const hit = verified.get(token);
  if (hit) {
    if (hit.expiresAtMs > Date.now()) return hit.payload;
    verified.delete(token);
  }
  const payload = await decode({ token, secret });
  if (payload && typeof payload.exp === "number") {
    if (verified.size >= MAX_TOKENS) verified.delete(verified.keys().next().value!);
    verified.set(token, { payload: Object.freeze(payload), expiresAtMs: payload.exp * 1000 });
  }
  return payload;
}

type CookieSource = Parameters<typeof getToken>[0]["req"];

/** The session's JWT payload, or null when there is none or it is expired, tampered or forged. */
export function readSessionToken(req: CookieSource): Promise<JWT | null> {
  return getToken({ req, secret: process.env.NEXTAUTH_SECRET, decode: decodeSessionToken });
}

/** Number of remembered tokens (for tests). */
export function rememberedTokenCount(): number {
  return verified.size;
}
