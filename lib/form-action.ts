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

/** The top line of a form whose refused fields are marked beside each field (and listed under it). */
export const CHECK_FIELDS = "Check the highlighted fields.";

/**
 * `fieldsBeside`: the form shows each field's message beside that field (and lists them at its top,
 * components/ui/form-error-summary.tsx). Then a refusal that names a field (an HttpError with
 * `details: { field }`, as the services throw) and a zod error become "Check the highlighted fields."
 * with the messages keyed by field; without it (forms that show only a message at the top) the
 * HttpError's message is the form's message.
 */
export type FormErrorOptions = { fieldsBeside?: boolean };

/** The field an HttpError's refusal concerns, when its details name one. */
export function refusedField(e: HttpError): string | null {
  const field = (e.details as { field?: unknown } | undefined)?.field;
  return typeof field === "string" && field ? field : null;
}

/**
 * The one mapping from a thrown error to form state, the server actions' counterpart of
 * `errorResponse` for route handlers: the same messages, the same blinding rule for engine messages,
 * and a logged reference instead of internals. Next's own control flow (redirect, notFound,
 * forbidden) passes through.
 */
export function formError(e: unknown, options: FormErrorOptions = {}): FormState {
  unstable_rethrow(e);
  if (e instanceof HttpError) {
    const field = options.fieldsBeside ? refusedField(e) : null;
    return field ? { error: CHECK_FIELDS, fieldErrors: { [field]: [e.message] } } : { error: e.message };
  }
  if (e instanceof ZodError) {
    // A form with messages beside its fields keys them by the field (a list's items under the list);
    // otherwise by the whole path. An issue about the whole form (no path) goes under "form".
    const fieldErrors: Record<string, string[]> = {};
    for (const issue of e.issues) (fieldErrors[(options.fieldsBeside ? issue.path.slice(0, 1) : issue.path).join(".") || "form"] ??= []).push(issueSentence(issue));
    return { error: options.fieldsBeside ? CHECK_FIELDS : errorSummary(e.issues), fieldErrors };
  }
  if (e instanceof StatsDomainError) return { error: publicErrorMessage(e, callerIsUnblinded()) };
  if (e instanceof WriteNotSavedError) return { error: e.message };
  if (isDatabaseDown(e)) return { error: "The database is not reachable just now; nothing was saved. Try again shortly." };
  const id = randomUUID();
  console.error(`[cairn] error ${id}`, e);
  return { error: `Something went wrong on the server (reference ${id}). Nothing was saved.` };
}

/** Wraps a server action so every failure reaches the form as a message, never the error page. */
export function formAction<S extends FormState, A extends unknown[]>(fn: (...args: A) => Promise<S>, options: FormErrorOptions = {}): (...args: A) => Promise<S | FormState> {
  return async (...args: A) => {
    try {
      return await fn(...args);
    } catch (e) {
      return formError(e, options);
    }
  };
}
