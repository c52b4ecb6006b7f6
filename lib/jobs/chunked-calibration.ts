/**
 * Runs the grid searches of lib/stats/calibration.ts (one arm) and lib/stats/calibration-two-arm.ts
 * (two arms) in chunks, yielding to the event loop between chunks, and merges the chunks' best
 * designs and the searched points (type I error, power) for the results chart. A one-arm chunk is
 * one thetaT value; a two-arm chunk is one thetaT and one thetaU value, because a two-arm grid point
 * costs a joint recursion per control rate and a cancel must not wait for a whole thetaU grid (the
 * two-arm search caches its per-thetaT tables, so splitting thetaU does not rebuild them). The chunk
 * itself may run in a worker thread (lib/jobs/pool.ts) or in process; progress and cancel are handled
 * here between chunks either way, and so is the pause that lets requests go first (pauseAfter). Pure
 * apart from the timers, so it can be unit-tested against one call over the whole grid.
 */
import type { CalibratedDesign, CalibrationOptions, CalibrationResult } from "@/lib/stats/calibration";
import type { Design } from "@/lib/stats/types";

export type ChunkedCalibrationInput = {
  design: Design;
  thetaTGrid: number[];
  thetaLGrid: number[];
  thetaUGrid: number[] | null;
  typeIErrorLimit: number;
  powerTarget: number;
  keep: number;
};

/** One searched grid point for the chart: type I error and power, rounded to 4 decimals. */
export type SearchedPoint = [typeIError: number, power: number];
/** The chart needs the cloud's shape, not every point: beyond this many distinct rounded points, later ones are dropped. */
const MAX_CHART_POINTS = 4000;

export type ChunkedProgress = {
  progress: number;
  evaluated: number;
  feasible: number;
  best: CalibratedDesign[];
  cancelled: boolean;
  /** Distinct (type I error, power) pairs of the grid points searched so far. */
  points: SearchedPoint[];
};

/** The same order the searches use: smallest expected sample size under the null, then higher power. */
function mergeBest(lists: CalibratedDesign[][], keep: number): CalibratedDesign[] {
  return lists
    .flat()
    .sort((u, v) => u.expectedSampleSizeNull - v.expectedSampleSizeNull || v.power - u.power)
    .slice(0, keep);
}

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));
const round4 = (v: number) => Math.round(v * 1e4) / 1e4;

/** The chunks of a search, in the order they run. */
function calibrationChunks(input: ChunkedCalibrationInput): { thetaTGrid: number[]; thetaUGrid: number[] | null }[] {
  const split = input.design.arms === "two" && input.thetaUGrid && input.thetaUGrid.length > 1;
  return input.thetaTGrid.flatMap((t) => (split ? (input.thetaUGrid as number[]).map((u) => ({ thetaTGrid: [t], thetaUGrid: [u] })) : [{ thetaTGrid: [t], thetaUGrid: input.thetaUGrid }]));
}

export async function runChunkedCalibration(
  input: ChunkedCalibrationInput,
  hooks: {
    calibrate: (design: Design, options: CalibrationOptions) => CalibrationResult | Promise<CalibrationResult>;
    shouldCancel: () => boolean;
    onChunk?: (p: ChunkedProgress) => void;
    /** Milliseconds to wait before the next chunk, given how long this one took (lib/jobs/back-off.ts). */
    pauseAfter?: (chunkMs: number) => number;
  },
): Promise<ChunkedProgress> {
  const state: ChunkedProgress = { progress: 0, evaluated: 0, feasible: 0, best: [], cancelled: false, points: [] };
  const seen = new Set<string>();
  const chunks = calibrationChunks(input);
  const n = chunks.length;
  for (let i = 0; i < n; i++) {
    await yieldToEventLoop();
    if (hooks.shouldCancel()) {
      state.cancelled = true;
      return state;
    }
    const started = performance.now();
    const r = await hooks.calibrate(input.design, {
      thetaTGrid: chunks[i].thetaTGrid,
      thetaLGrid: input.thetaLGrid,
      thetaUGrid: chunks[i].thetaUGrid,
      typeIErrorLimit: input.typeIErrorLimit,
      powerTarget: input.powerTarget,
      keep: input.keep,
    });
    state.evaluated += r.evaluated;
    state.feasible += r.feasible;
    state.best = mergeBest([state.best, r.best], input.keep);
    for (let j = 0; j < r.typeIError.length && state.points.length < MAX_CHART_POINTS; j++) {
      if (Number.isNaN(r.typeIError[j])) continue;
      const p: SearchedPoint = [round4(r.typeIError[j]), round4(r.power[j])];
      const key = `${p[0]}:${p[1]}`;
      if (seen.has(key)) continue;
      seen.add(key);
      state.points.push(p);
    }
    state.progress = (i + 1) / n;
    hooks.onChunk?.({ ...state, points: state.points.slice() });
    const pause = i + 1 < n ? (hooks.pauseAfter?.(performance.now() - started) ?? 0) : 0;
    if (pause > 0) await new Promise<void>((resolve) => setTimeout(resolve, pause));
  }
  return state;
}
