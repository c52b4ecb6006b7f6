/**
 * Lowers the scheduling priority of the current worker thread (Linux only), so that on a small
 * machine the event loop answering requests wins the CPU when both want it; the statistics still
 * use whatever the requests leave. On Linux setpriority(PRIO_PROCESS, tid) applies to a single
 * thread, and /proc/thread-self names this thread's id. Elsewhere, or if refused, nothing changes.
 */
import { readlinkSync } from "node:fs";
import { setPriority } from "node:os";
import { isMainThread } from "node:worker_threads";

/**
 * Niceness for statistics threads: 19, the lowest priority, so that under Linux's fair scheduler a
 * busy request thread gets about 98% of a shared core (weights 1024 against 15). At 10 a
 * calibration pushed the interval question's p95 over 100 ms in scripts/load-test.ts
 * --during-calibration on the 2-core machine; an idle core is still the worker's in full.
 */
export const WORKER_NICENESS = 19;

export function lowerThisThreadPriority(niceness = WORKER_NICENESS): boolean {
  // Never the main thread: that one answers the requests.
  if (isMainThread || process.platform !== "linux") return false;
  try {
    const tid = Number(readlinkSync("/proc/thread-self").split("/").pop());
    if (!Number.isInteger(tid) || tid <= 0) return false;
    setPriority(tid, niceness);
    return true;
  } catch {
    return false;
  }
}
