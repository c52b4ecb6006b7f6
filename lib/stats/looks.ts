/**
 * The planned looks of a design as a sorted list of (per-arm) enrolled counts ending at nMax.
 */
import type { LookSchedule } from "./types";
import { requireCount, StatsDomainError } from "./validate";

/**
 * Expand a look schedule into the sorted list of distinct look sizes, the last one being nMax.
 *
 * @param schedule - `{ kind: "list", sizes }`: each size a positive integer; sizes above nMax are
 *   dropped (the trial cannot enrol past nMax) and duplicates merged. `{ kind: "every", first,
 *   every }`: first and every positive integers; looks at first, first + every, ... up to nMax.
 * @param nMax - maximum (per-arm) sample size, a positive integer. Always the last look, because
 *   the final analysis is where the success rule is applied.
 * @returns strictly increasing positive integers, last element nMax.
 * @throws StatsDomainError when nMax, a size, first or every is not a positive integer, or the
 *   schedule kind is unknown.
 * @example expandLooks({ kind: "list", sizes: [20, 10, 10, 50] }, 40) // [10, 20, 40]
 * @example expandLooks({ kind: "every", first: 10, every: 5 }, 22) // [10, 15, 20, 22]
 */
export function expandLooks(schedule: LookSchedule, nMax: number): number[] {
  requirePositiveCount("nMax", nMax);
  if (!schedule || typeof schedule !== "object")
    throw new StatsDomainError("looks", schedule, "must be a look schedule object");
  const sizes: number[] = [];
  if (schedule.kind === "list") {
    if (!Array.isArray(schedule.sizes)) throw new StatsDomainError("looks.sizes", schedule.sizes, "must be an array");
    for (const s of schedule.sizes) {
      requirePositiveCount("looks.sizes[]", s);
      if (s <= nMax) sizes.push(s);
    }
  } else if (schedule.kind === "every") {
    requirePositiveCount("looks.first", schedule.first);
    requirePositiveCount("looks.every", schedule.every);
    for (let s = schedule.first; s <= nMax; s += schedule.every) sizes.push(s);
  } else {
    throw new StatsDomainError("looks.kind", (schedule as { kind: unknown }).kind, 'must be "list" or "every"');
  }
  sizes.push(nMax);
  return [...new Set(sizes)].sort((a, b) => a - b);
}

function requirePositiveCount(name: string, v: number): void {
  requireCount(name, v);
  if (v < 1) throw new StatsDomainError(name, v, "must be a positive integer");
}
