/**
 * A worker thread hands errors back by structured clone, which keeps only name and message: a
 * StatsDomainError (mapped to 422 by lib/http.ts) would arrive as a plain Error (500). Workers
 * therefore return a tagged outcome and the pool rebuilds the error on the main thread.
 */
import { StatsDomainError } from "@/lib/stats/validate";

export type WorkerOutcome<T> = { ok: true; value: T } | { ok: false; error: WorkerError };

type WorkerError =
  | { kind: "domain"; argument: string; value: string; rule: string }
  | { kind: "other"; name: string; message: string };

export function captureOutcome<T>(compute: () => T): WorkerOutcome<T> {
  try {
    return { ok: true, value: compute() };
  } catch (e) {
    if (e instanceof StatsDomainError) return { ok: false, error: { kind: "domain", argument: e.argument, value: String(e.value), rule: e.rule } };
    const err = e instanceof Error ? e : new Error(String(e));
    return { ok: false, error: { kind: "other", name: err.name, message: err.message } };
  }
}

export function unwrapOutcome<T>(outcome: WorkerOutcome<T>): T {
  if (outcome.ok) return outcome.value;
  const e = outcome.error;
  if (e.kind === "domain") throw new StatsDomainError(e.argument, e.value, e.rule);
  const err = new Error(e.message);
  err.name = e.name;
  throw err;
}
