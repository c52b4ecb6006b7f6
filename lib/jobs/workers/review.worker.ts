/**
 * Worker-thread entry (piscina): the closed review of a locked look, computed once and kept in
 * review_cache by lib/review/review-cache.ts. Pure: imports only lib/review/compute-review and
 * lib/stats, so it bundles for plain Node into .workers/review.worker.mjs. It returns the JSON
 * text, so the main thread stores it without serialising the review again.
 */
import { computeReview, type ReviewInput } from "@/lib/review/compute-review";
import { captureOutcome, type WorkerOutcome } from "./worker-errors";
import { lowerThisThreadPriority } from "./lower-priority";
import { reviewToJson } from "@/lib/review/review-json";

lowerThisThreadPriority();

export type ReviewTask = { input: ReviewInput };

export function computeReviewJson(task: ReviewTask): string {
  return reviewToJson(computeReview(task.input));
}

export default function reviewTask(task: ReviewTask): WorkerOutcome<string> {
  return captureOutcome(() => computeReviewJson(task));
}
