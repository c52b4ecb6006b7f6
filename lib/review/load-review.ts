import "server-only";
/**
 * CLOSED: loads what computeReview needs for one analysis from the database. Callers must have
 * passed requireTrialAccess(..., "viewClosed") (or authorizePage with it) first.
 */
import { fetchAnalysesOpen } from "@/db/queries/analyses";
import { armCountsOf, fetchArmAtLook, fetchArmCountsForTrial } from "@/db/queries/closed";
import type { ClosedReader } from "@/db/knex";
import { fetchDesign, parseStoredDesign } from "@/db/queries/designs";
import { fetchRecommendationsClosed, fetchReviewSignatures } from "@/db/queries/recommendations";
import { fetchArms } from "@/db/queries/trials";
import type { AnalysisOpenRow, TrialRow } from "@/db/types";
import { notFoundError, conflict } from "@/lib/http";
import { armPosterior, reproducibilityRecord, type ReviewInput, type ReviewLook } from "./compute-review";

/** The design version a review is computed under (the one the look is on: locked looks keep theirs). */
type ReviewDesignVersion = { id: number; version: number; status: "draft" | "locked" | "superseded"; lockedAt: Date | null };

export type ReviewContext = { input: ReviewInput; analysis: AnalysisOpenRow; looks: AnalysisOpenRow[]; designVersion: ReviewDesignVersion };

const REVIEWABLE = new Set(["locked", "reviewed"]);
const NOT_LOCKED = "This look has not been locked yet, so there is nothing to review.";

function cutoffText(v: unknown): string | null {
  if (v === null || v === undefined) return null;
  if (v instanceof Date) return `${v.getFullYear()}-${String(v.getMonth() + 1).padStart(2, "0")}-${String(v.getDate()).padStart(2, "0")}`;
  return String(v);
}

/** @throws HttpError 404 when the analysis is not this trial's, 409 when it is not locked yet. */
export async function loadReviewInput(trial: TrialRow, analysisId: number, closed: ClosedReader, now: Date = new Date()): Promise<ReviewContext> {
  const looks = await fetchAnalysesOpen(trial.id);
  const analysis = looks.find((l) => l.id === analysisId);
  if (!analysis) throw notFoundError("That analysis");
  if (!REVIEWABLE.has(analysis.status)) throw conflict(NOT_LOCKED);
  const [design, arms, counts] = await Promise.all([fetchDesign(analysis.design_id), fetchArms(trial.id), fetchArmCountsForTrial(trial.id, closed)]);
  if (!design) throw notFoundError("The design of that analysis");
  const locked = looks.filter((l) => REVIEWABLE.has(l.status) && l.look_number <= analysis.look_number);
  const reviewLooks: ReviewLook[] = locked.map((l) => ({
    analysisId: l.id,
    lookNumber: l.look_number,
    cutoffDate: cutoffText(l.cutoff_date),
    plannedN: l.planned_n,
    counts: counts
      .filter((c) => c.analysis_id === l.id)
      .map(armCountsOf),
  }));
  return {
    analysis,
    looks,
    designVersion: { id: design.id, version: design.version, status: design.status, lockedAt: design.locked_at },
    input: {
      design: design.spec,
      arms: arms.map((a) => ({ id: a.id, label: a.label, role: a.arm_role })),
      looks: reviewLooks,
      analysisId,
      generatedAt: now.toISOString(),
    },
  };
}

/** The review of a locked look: kept in review_cache after its first computation (lib/review/review-cache.ts). */
export async function loadReview(trial: TrialRow, analysisId: number, closed: ClosedReader) {
  const ctx = await loadReviewInput(trial, analysisId, closed);
  const { cachedReview } = await import("./review-cache");
  return { ...ctx, review: await cachedReview(ctx, closed) };
}

/**
 * The JSON export (unblinded only: the caller passed viewClosed). Beside the inputs and outputs it
 * names the design version used, the review version, and the signatures that locked the design and
 * the look and that recorded each recommendation, with the hashes of the records they signed, so
 * an auditor can tie the numbers to the signed records.
 */
export async function loadReproducibilityRecord(trial: TrialRow, analysisId: number, closed: ClosedReader) {
  const ctx = await loadReviewInput(trial, analysisId, closed);
  const [signatures, recommendations] = await Promise.all([fetchReviewSignatures(analysisId), fetchRecommendationsClosed(trial.id, analysisId)]);
  return {
    ...reproducibilityRecord(ctx.input, await (await import("./review-cache")).cachedReview(ctx, closed)),
    trial: { id: trial.id, code: trial.code },
    provenance: {
      designVersion: ctx.designVersion,
      reviewVersion: ctx.analysis.review_version,
      amendment: ctx.analysis.amendment_count,
      designSignature: signatures.design,
      lockSignature: signatures.lock,
      recommendations: recommendations.map((r) => ({ id: r.id, reviewVersion: r.reviewVersion, superseded: r.superseded, decision: r.decision, correctsId: r.correctsId, signatureId: r.signatureId, recordHash: r.recordHash, signedAt: r.signedAt })),
    },
  };
}

/** One arm's posterior at one look; a single query, because the interval question asks it at typing speed. */
export async function loadArmPosterior(trial: TrialRow, analysisId: number, armId: number, closed: ClosedReader) {
  const row = await fetchArmAtLook(trial.id, analysisId, armId, closed);
  if (!row) throw notFoundError("That analysis");
  if (!REVIEWABLE.has(row.status)) throw conflict(NOT_LOCKED);
  // An arm of another trial, or a look without counts, reaches armPosterior empty, which refuses it
  // with the same domain error (422) the full review gives.
  const arms = row.arm_id === null ? [] : [{ id: row.arm_id, label: row.arm_label!, role: row.arm_role! }];
  const counts =
    row.arm_id === null || row.evaluable === null
      ? []
      : [{ armId: row.arm_id, enrolled: row.enrolled!, treated: row.treated, evaluable: row.evaluable, responders: row.responders!, toxicities: row.toxicities }];
  const look: ReviewLook = { analysisId, lookNumber: row.look_number, cutoffDate: cutoffText(row.cutoff_date), counts };
  return armPosterior(parseStoredDesign(row.spec), arms, look, armId);
}
