/**
 * Runs the grid search of lib/stats/calibration.ts in chunks of one thetaT value, yielding to the
 * event loop between chunks, and merges the chunks' best designs. The chunk itself may run in a
 * worker thread (lib/jobs/pool.ts) or in process; progress and cancel are handled here between
 * chunks either way, and so is the pause that lets requests go first (pauseAfter). Pure apart from the timers, so it can be unit-tested against one call over the
 * whole grid.
 */
import type { CalibratedDesign, CalibrationOptions, CalibrationResult } from "@/lib/stats/calibration";
import type { SingleArmDesign } from "@/lib/stats/types";

export type ChunkedCalibrationInput = {
  design: SingleArmDesign;
  thetaTGrid: number[];
  thetaLGrid: number[];
  thetaUGrid: number[] | null;
  typeIErrorLimit: number;
  powerTarget: number;
  keep: number;
};

export type ChunkedProgress = { progress: number; evaluated: number; feasible: number; best: CalibratedDesign[]; cancelled: boolean };

/** The same order calibrateSingleArm uses: smallest expected sample size under p0, then higher power. */
export function mergeBest(lists: CalibratedDesign[][], keep: number): CalibratedDesign[] {
  return lists
    .flat()
    .sort((u, v) => u.expectedSampleSizeNull - v.expectedSampleSizeNull || v.power - u.power)
    .slice(0, keep);
}

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

export async function runChunkedCalibration(
  input: ChunkedCalibrationInput,
  hooks: {
    calibrate: (design: SingleArmDesign, options: CalibrationOptions) => CalibrationResult | Promise<CalibrationResult>;
    shouldCancel: () => boolean;
    onChunk?: (p: ChunkedProgress) => void;
    /** Milliseconds to wait before the next chunk, given how long this one took (lib/jobs/back-off.ts). */
    pauseAfter?: (chunkMs: number) => number;
  },
): Promise<ChunkedProgress> {
  const state: ChunkedProgress = { progress: 0, evaluated: 0, feasible: 0, best: [], cancelled: false };
  const n = input.thetaTGrid.length;
  for (let i = 0; i < n; i++) {
    await yieldToEventLoop();
    if (hooks.shouldCancel()) {
      state.cancelled = true;
      return state;
    }
    const started = performance.now();
    const r = await hooks.calibrate(input.design, {
      thetaTGrid: [input.thetaTGrid[i]],
      thetaLGrid: input.thetaLGrid,
      thetaUGrid: input.thetaUGrid,
      typeIErrorLimit: input.typeIErrorLimit,
      powerTarget: input.powerTarget,
      keep: input.keep,
    });
    state.evaluated += r.evaluated;
    state.feasible += r.feasible;
    state.best = mergeBest([state.best, r.best], input.keep);
    state.progress = (i + 1) / n;
    hooks.onChunk?.({ ...state });
    const pause = i + 1 < n ? (hooks.pauseAfter?.(performance.now() - started) ?? 0) : 0;
    if (pause > 0) await new Promise<void>((resolve) => setTimeout(resolve, pause));
  }
  return state;
}
