/**
 * Background statistics give way to requests. Between two slices of a calibration the job looks
 * at how busy the request thread (the event loop) was during the last slice; when it was busy,
 * the next slice waits, so the search takes at most a quarter of a core while requests queue and
 * all of it when they do not. Measured with scripts/load-test.ts --during-calibration.
 */
import { performance, type EventLoopUtilization } from "node:perf_hooks";

/** Below this share of time busy, the request thread has room and the job runs at full speed. */
export const BUSY_FROM = 0.5;
/** At a fully busy request thread, wait this many times the slice's own duration (duty cycle 1 / (1 + 3)). */
export const MAX_PAUSE_PER_SLICE = 3;
/** Never wait longer than this between slices, so progress keeps moving on a busy server. */
export const MAX_PAUSE_MS = 2_000;

/** Pure: the pause before the next slice, from the event-loop utilisation in [0, 1] and the slice time. */
export function pauseBeforeNextSlice(utilization: number, sliceMs: number): number {
  if (!(utilization > BUSY_FROM) || !(sliceMs > 0)) return 0;
  const busy = Math.min(1, (utilization - BUSY_FROM) / (1 - BUSY_FROM));
  return Math.min(MAX_PAUSE_MS, Math.round(busy * MAX_PAUSE_PER_SLICE * sliceMs));
}

/** A reading of the event loop's cumulative idle and active time (node:perf_hooks' shape). */
export type LoopTimes = Pick<EventLoopUtilization, "idle" | "active">;

/**
 * Event-loop utilisation since the previous call of this watcher: active / (idle + active) over
 * the interval, from two cumulative readings. `read` is the clock (node:perf_hooks by default); a
 * test passes its own readings, so the arithmetic is checked exactly, independent of machine load.
 */
export function eventLoopWatcher(read: () => LoopTimes = () => performance.eventLoopUtilization()): () => number {
  let last = read();
  return () => {
    const now = read();
    const idle = now.idle - last.idle;
    const active = now.active - last.active;
    last = now;
    return idle + active > 0 ? active / (idle + active) : 0;
  };
}
