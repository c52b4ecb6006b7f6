import "server-only";
import { errorSummary, issueSentence } from "./form-errors";
import { randomUUID } from "node:crypto";
import { AsyncLocalStorage } from "node:async_hooks";
import { NextResponse } from "next/server";
import { ZodError } from "zod";
import { StatsDomainError } from "./stats/validate";
import { isDatabaseDown, WriteNotSavedError } from "@/db/errors";

export { isDatabaseDown };

/** An error with an HTTP meaning; thrown anywhere on the server, mapped once by `errorResponse`. */
export class HttpError extends Error {
  constructor(
    public readonly status: 400 | 401 | 403 | 404 | 409 | 413 | 415 | 422 | 429 | 503,
    message: string,
    public readonly details?: unknown,
  ) {
    super(message);
    this.name = "HttpError";
  }
}

export const unauthorized = () => new HttpError(401, "Sign in to continue.");
export const forbiddenError = (what = "this") => new HttpError(403, `Your role on this trial does not allow ${what}.`);
export const notFoundError = (what = "That record") => new HttpError(404, `${what} was not found.`);
export const conflict = (message: string) => new HttpError(409, message);
/** A refusal that concerns one form field: forms show the message beside it (lib/form-action.ts, refusedField). */
export const fieldRefusal = (status: 409 | 422, message: string, field: string) => new HttpError(status, message, { field });

/**
 * Whether this request's caller is unblinded on the trial it touched, recorded by lib/auth when it
 * decides trial access. An engine message can quote values from closed rows ("... (got 43)"), so
 * it is passed on only to an unblinded caller; with no record (no trial access decided, or a
 * blinded role) the caller gets generic text. Blinded is the default by construction.
 */
const callerClearance = new AsyncLocalStorage<{ unblinded: boolean }>();

export function noteCallerClearance(unblinded: boolean): void {
  const store = callerClearance.getStore();
  if (store) store.unblinded = unblinded;
}

/** Runs fn with a fresh clearance record (blinded until lib/auth says otherwise). */
function withCallerClearance<T>(fn: () => Promise<T>): Promise<T> {
  return callerClearance.run({ unblinded: false }, fn);
}

export const callerIsUnblinded = (): boolean => callerClearance.getStore()?.unblinded === true;

/** What a blinded caller is told instead of an engine message. */
const GENERIC_ENGINE_MESSAGE = "The request cannot be computed from the stored data. An unblinded statistician can see the reason.";

/** The message a server action may show for an error, under the same rule as errorResponse. */
export function publicErrorMessage(e: unknown, unblinded: boolean): string {
  if (e instanceof HttpError) return e.message;
  if (e instanceof StatsDomainError) return unblinded ? `The request is not valid: ${e.message}.` : GENERIC_ENGINE_MESSAGE;
  return "Something went wrong on the server.";
}

/**
 * invalid input 422 with the issues; no session 401; wrong role 403; missing 404; conflict 409;
 * database unreachable 503; anything else 500 with a logged id and no internals.
 */
export function errorResponse(e: unknown): NextResponse {
  if (e instanceof HttpError) {
    return NextResponse.json({ error: e.message, ...(e.details ? { details: e.details } : {}) }, { status: e.status });
  }
  if (e instanceof ZodError) {
    return NextResponse.json(
      {
        // Sentences, never zod's programmer wording: the forms show these as they come.
        error: errorSummary(e.issues),
        issues: e.issues.map((i) => ({ path: i.path.join("."), message: issueSentence(i) })),
      },
      { status: 422 },
    );
  }
  if (e instanceof StatsDomainError) {
    return NextResponse.json({ error: publicErrorMessage(e, callerIsUnblinded()) }, { status: 422 });
  }
  if (e instanceof SyntaxError) {
    return NextResponse.json({ error: "The request body is not valid JSON." }, { status: 400 });
  }
  if (e instanceof WriteNotSavedError) return NextResponse.json({ error: e.message }, { status: 503 });
  if (isDatabaseDown(e)) {
    return NextResponse.json({ error: "The database is not reachable just now; nothing was saved. Try again shortly." }, { status: 503 });
  }
  const id = randomUUID();
  console.error(`[cairn] error ${id}`, e);
  return NextResponse.json({ error: `Something went wrong on the server (reference ${id}).` }, { status: 500 });
}

/**
 * CSRF defence for the JSON API: a state-changing request that carries an Origin (every browser
 * sends one on cross-site POST, PUT, PATCH and DELETE) must come from this site. Server actions
 * get the same check from Next itself; next-auth's own routes use its CSRF token.
 */
function isCrossSiteWrite(req: Request): boolean {
  if (["GET", "HEAD", "OPTIONS"].includes(req.method)) return false;
  const origin = req.headers.get("origin");
  if (!origin) return false;
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host") ?? new URL(req.url).host;
  try {
    return new URL(origin).host !== host;
  } catch {
    return true;
  }
}

/**
 * Wraps a route handler: a cross-site write is refused before the handler runs, and every thrown
 * error goes through the one mapping. (Route handlers do not pass through proxy.ts, so this is
 * where the API's request-level checks live; who may do what is lib/auth's.)
 */
export function handle<A extends unknown[]>(fn: (...args: A) => Promise<Response>) {
  return async (...args: A): Promise<Response> => {
    if (args[0] instanceof Request && isCrossSiteWrite(args[0])) {
      return noStore(NextResponse.json({ error: "Cross-site requests may not change data." }, { status: 403 }));
    }
    return withCallerClearance(async () => {
      try {
        return noStore(await fn(...args));
      } catch (e) {
        return noStore(errorResponse(e));
      }
    });
  };
}

/**
 * An API answer may hold closed data: no cache may keep it. next.config.mjs sets the same header
 * for /api; this also covers route handlers outside /api (the caught-mail download) and keeps a
 * handler's own stricter value ("private, no-store") when it sets one.
 */
function noStore(res: Response): Response {
  if (/no-store/.test(res.headers.get("Cache-Control") ?? "")) return res;
  try {
    res.headers.set("Cache-Control", "no-store");
  } catch {
    // Immutable headers (Response.redirect): such an answer carries no data.
  }
  return res;
}

/** Reads a JSON body with a size ceiling, so an oversized body is refused before parsing. */
export async function readJson(req: Request, maxBytes = 256 * 1024): Promise<unknown> {
  const len = Number(req.headers.get("content-length") ?? 0);
  if (len > maxBytes) throw new HttpError(413, `The request body is larger than ${Math.round(maxBytes / 1024)} KB.`);
  const text = await req.text();
  if (text.length > maxBytes) throw new HttpError(413, `The request body is larger than ${Math.round(maxBytes / 1024)} KB.`);
  try {
    return JSON.parse(text);
  } catch {
    throw new HttpError(400, "The request body is not valid JSON.");
  }
}
