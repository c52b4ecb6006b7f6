/**
 * The closed review as JSON text and back, without loss: JSON has no NaN or infinities, so those
 * numbers travel as {"$number": "NaN" | "Infinity" | "-Infinity"}; everything else is plain JSON.
 * Pure (no I/O), so the review worker can use it.
 */
import type { Review } from "./compute-review";

const TAG = "$number";

export function reviewToJson(review: Review): string {
  return JSON.stringify(review, (_k, v) => (typeof v === "number" && !Number.isFinite(v) ? { [TAG]: String(v) } : v));
}

export function reviewFromJson(text: string): Review {
  return JSON.parse(text, (_k, v) => {
    if (v && typeof v === "object" && !Array.isArray(v)) {
      const keys = Object.keys(v);
      if (keys.length === 1 && keys[0] === TAG) return Number(v[TAG]);
    }
    return v;
  }) as Review;
}
