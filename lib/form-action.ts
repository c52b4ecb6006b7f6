import "server-only";
import { randomUUID } from "node:crypto";
import { unstable_rethrow } from "next/navigation";
import { ZodError } from "zod";
import { callerIsUnblinded, HttpError, isDatabaseDown, publicErrorMessage } from "./http";
import { StatsDomainError } from "./stats/validate";
import { errorSummary, issueSentence } from "./form-errors";
import { WriteNotSavedError } from "@/db/errors";

/** What every server action answers a form with: a message, or an error with the fields it concerns. */
export type FormState = { ok?: string; error?: string; fieldErrors?: Record<string, string[] | undefined> };

/**
 * The one mapping from a thrown error to form state, the server actions' counterpart of
 * `errorResponse` for route handlers: the same messages, the same blinding rule for engine messages,
 * and a logged reference instead of internals. Next's own control flow (redirect, notFound,
 * forbidden) passes through.
 */
export function formError(e: unknown): FormState {
  unstable_rethrow(e);
  if (e instanceof HttpError) return { error: e.message };
  if (e instanceof ZodError) {
    const fieldErrors: Record<string, string[]> = {};
    for (const issue of e.issues) (fieldErrors[issue.path.join(".") || "form"] ??= []).push(issueSentence(issue));
    return { error: errorSummary(e.issues), fieldErrors };
  }
  if (e instanceof StatsDomainError) return { error: publicErrorMessage(e, callerIsUnblinded()) };
  if (e instanceof WriteNotSavedError) return { error: e.message };
  if (isDatabaseDown(e)) return { error: "The database is not reachable just now; nothing was saved. Try again shortly." };
  const id = randomUUID();
  console.error(`[cairn] error ${id}`, e);
  return { error: `Something went wrong on the server (reference ${id}). Nothing was saved.` };
}

/** Wraps a server action so every failure reaches the form as a message, never the error page. */
export function formAction<S extends FormState, A extends unknown[]>(fn: (...args: A) => Promise<S>): (...args: A) => Promise<S | FormState> {
  return async (...args: A) => {
    try {
      return await fn(...args);
    } catch (e) {
      return formError(e);
    }
  };
}
