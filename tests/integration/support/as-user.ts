/**
 * Lets integration tests call route handlers and server actions directly, as a chosen user: the
 * test file mocks lib/auth/session's sessionUserId to return `currentSession()`'s user id. Everything after the
 * session (lib/auth's role checks, zod, the database) runs for real.
 */
let session: { user: { id: number; email?: string; name?: string } } | null = null;

export function actAs(userId: number | null) {
  session = userId === null ? null : { user: { id: userId } };
}

export function currentSession() {
  return session;
}

/** The second argument Next passes to a route handler. */
export function routeContext<P extends Record<string, string>>(params: P) {
  return { params: Promise.resolve(params) };
}

export function jsonRequest(url: string, method: string, body?: unknown, headers: Record<string, string> = {}) {
  const text = body === undefined ? undefined : typeof body === "string" ? body : JSON.stringify(body);
  return new Request(`http://localhost${url}`, { method, body: text, headers: { "content-type": "application/json", ...headers } });
}

/**
 * What a mocked lib/auth/session's sessionClaims answers: the acting user with the account's
 * current session version, as a token issued just now would carry. Tests of stale sessions pass
 * their own claims instead.
 */
export async function currentClaims(): Promise<{ userId: number; sessionVersion: number } | null> {
  if (!session) return null;
  const { db } = await import("@/db/knex");
  const row = await db("users").where({ id: session.user.id }).first("session_version");
  return { userId: session.user.id, sessionVersion: Number(row?.session_version ?? 0) };
}
