import "server-only";
/**
 * Who is signed in, from the session cookie of the request being served. The session says only
 * who someone is; lib/auth reads what they may do from the database on every request.
 */
import { cookies, headers } from "next/headers";
import { readSessionToken } from "./session-token";

export async function sessionUserId(): Promise<number | null> {
  const [h, c] = await Promise.all([headers(), cookies()]);
  // getToken reads only cookies.getAll() and headers' authorization, which next/headers provides.
  const token = await readSessionToken({ headers: h, cookies: c } as unknown as Parameters<typeof readSessionToken>[0]);
  const uid = Number(token?.uid);
  return Number.isInteger(uid) && uid > 0 ? uid : null;
}
