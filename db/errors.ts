// Database failure kinds, told apart here so db/ needs nothing from the HTTP layer; lib/http and
// lib/form-action map them to a 503 answer or a form message.

/** The database could not be reached, or the connection broke under a statement (mysql2 marks that fatal). */
export function isDatabaseDown(e: unknown): boolean {
  if (e instanceof WriteNotSavedError) return true;
  const code = (e as { code?: string })?.code ?? "";
  return ["ECONNREFUSED", "PROTOCOL_CONNECTION_LOST", "ETIMEDOUT", "ECONNRESET", "ER_CON_COUNT_ERROR"].includes(code) ||
    (e as { fatal?: boolean })?.fatal === true ||
    (e instanceof Error && /Knex: Timeout acquiring a connection/.test(e.message));
}

/** Thrown by writeTransaction when the connection was lost before its transaction committed. */
export class WriteNotSavedError extends Error {
  constructor() {
    super("The database connection was lost before the change was committed, so nothing was saved. Try again in a moment.");
    this.name = "WriteNotSavedError";
  }
}
