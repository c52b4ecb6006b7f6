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
