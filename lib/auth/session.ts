import "server-only";
/**
 * Who is signed in, from the session cookie of the request being served. The session says only
 * who someone is and which session version of the account it was issued under; lib/auth reads what
 * they may do, and whether that version is still current, from the database on every request.
 */
import { cookies, headers } from "next/headers";
import { readSessionToken } from "./session-token";

type SessionClaims = { userId: number; sessionVersion: number };

export async function sessionClaims(): Promise<SessionClaims | null> {
  const [h, c] = await Promise.all([headers(), cookies()]);
  // getToken reads only cookies.getAll() and headers' authorization, which next/headers provides.
  const token = await readSessionToken({ headers: h, cookies: c } as unknown as Parameters<typeof readSessionToken>[0]);
  const uid = Number(token?.uid);
  const sv = Number(token?.sv);
  // A token without a version (or with a malformed one) is refused, not treated as current.
  if (!Number.isInteger(uid) || uid <= 0 || !Number.isInteger(sv) || sv < 0) return null;
  return { userId: uid, sessionVersion: sv };
}

export async function sessionUserId(): Promise<number | null> {
  return (await sessionClaims())?.userId ?? null;
}
