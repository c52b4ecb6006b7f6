import "server-only";
import { notFound } from "next/navigation";
import { notFoundError } from "@/lib/http";

// One parser for every id that arrives from outside: a URL segment of a page or a route handler, or
// a hidden form field of a server action. Anything but a plain positive 32-bit id is "not found",
// never a 500 and never a query with NaN.

const ID = /^[1-9][0-9]{0,9}$/;
const MAX_ID = 2_147_483_647;

/** The id, or null when the text is not a plain positive 32-bit integer. */
function routeIdOrNull(raw: unknown): number | null {
  if (typeof raw !== "string" || !ID.test(raw)) return null;
  const n = Number(raw);
  return n > MAX_ID ? null : n;
}

/** For pages: a bad id renders the not-found page. */
export function parseId(raw: string | undefined): number {
  const n = routeIdOrNull(raw);
  if (n === null) notFound();
  return n;
}

/** For route handlers: a bad id is a 404 answer naming what was not found. */
export function idFrom(raw: string | undefined, what: string): number {
  const n = routeIdOrNull(raw);
  if (n === null) throw notFoundError(what);
  return n;
}

/** For server actions: a bad hidden id becomes 0, which no record has, so the access check answers "not found". */
export function formId(v: FormDataEntryValue | null): number {
  return routeIdOrNull(v) ?? 0;
}

export type LookRouteParams = { params: Promise<{ trialId: string; analysisId: string }> };

export async function lookIds(ctx: LookRouteParams): Promise<{ trialId: number; analysisId: number }> {
  const p = await ctx.params;
  return { trialId: idFrom(p.trialId, "That trial"), analysisId: idFrom(p.analysisId, "That look") };
}
