import "server-only";
/**
 * CLOSED: the closed review of a locked look, computed once and kept (review_cache). A locked
 * look's review never changes, so it is computed in a worker thread (lib/jobs/pool.ts) when the
 * look is locked, or on the first read if that did not happen, and read back afterwards.
 *
 * Key: look (analysis id), review version, engine version and the SHA-256 of the review's inputs
 * (design, arms, every locked look's counts up to this one). Corrected data, a changed earlier
 * look or a new engine give another key, so a stale row is never served; reopening a look also
 * deletes its rows. Reads and writes go through db/queries/closed.ts with a closed reader only.
 */
import { createHash } from "node:crypto";
import { db, type ClosedReader } from "@/db/knex";
import { fetchCachedReviewJson, storeCachedReviewJson, type ReviewCacheKey } from "@/db/queries/closed";
import type { TrialRow } from "@/db/types";
import { runReviewComputation } from "@/lib/jobs/pool";
import { ENGINE_VERSION } from "@/lib/stats/version";
import type { Review, ReviewInput } from "./compute-review";
import { loadReviewInput, type ReviewContext } from "./load-review";
import { reviewFromJson } from "./review-json";

/** JSON with object keys sorted, so the hash depends on the data and not on the order keys were written in. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(",")}]`;
  if (v && typeof v === "object" && !(v instanceof Date))
    return `{${Object.keys(v)
      .sort()
      .filter((k) => (v as Record<string, unknown>)[k] !== undefined)
      .map((k) => `${JSON.stringify(k)}:${canonical((v as Record<string, unknown>)[k])}`)
      .join(",")}}`;
  return JSON.stringify(v);
}

/** SHA-256 of everything the review is computed from (generatedAt, a timestamp for the export, excluded). */
export function reviewInputSha256(input: ReviewInput): string {
  const { generatedAt: _generatedAt, ...rest } = input;
  return createHash("sha256").update(canonical(rest), "utf8").digest("hex");
}

function reviewCacheKey(ctx: ReviewContext): ReviewCacheKey {
  return { analysisId: ctx.analysis.id, reviewVersion: ctx.analysis.review_version, engineVersion: ENGINE_VERSION, inputSha256: reviewInputSha256(ctx.input) };
}

/** The review of a loaded look: the kept one when its key matches, else computed (worker thread), kept and returned. */
export async function cachedReview(ctx: ReviewContext, closed: ClosedReader): Promise<Review> {
  const key = reviewCacheKey(ctx);
  const kept = await fetchCachedReviewJson(key, closed);
  if (kept !== null) return reviewFromJson(kept);
  const json = await runReviewComputation({ input: ctx.input });
  await storeCachedReviewJson(key, json, closed);
  return reviewFromJson(json);
}

type WarmState = { pending: Map<number, Promise<void>> };
const warmState: WarmState = ((globalThis as unknown as { cairnReviewWarm?: WarmState }).cairnReviewWarm ??= { pending: new Map() });

/**
 * Computes and keeps a look's review right after its lock committed, in the background, so the
 * first DMC reader does not wait. Called by the lock route, which checked enterData (an unblinded
 * role): the reads run in their own short transaction (a closed reader, as a service's write
 * transaction is), the computation outside it. A failure is logged and left to the first read.
 */
export function warmReviewCache(trial: TrialRow, analysisId: number): Promise<void> {
  const run = (async () => {
    const ctx = await db.transaction((tx) => loadReviewInput(trial, analysisId, tx));
    const key = reviewCacheKey(ctx);
    if ((await db.transaction((tx) => fetchCachedReviewJson(key, tx))) !== null) return;
    const json = await runReviewComputation({ input: ctx.input });
    await db.transaction((tx) => storeCachedReviewJson(key, json, tx));
  })().catch((e) => {
    console.error(`[cairn] could not keep the review of analysis ${analysisId} after its lock; it will be computed on first read`, e);
  });
  const tracked = run.finally(() => {
    if (warmState.pending.get(analysisId) === tracked) warmState.pending.delete(analysisId);
  });
  warmState.pending.set(analysisId, tracked);
  return tracked;
}

/** The background warm-up of a look still running, if any (tests; diagnostics). */
export function pendingReviewWarmUp(analysisId: number): Promise<void> | undefined {
  return warmState.pending.get(analysisId);
}
