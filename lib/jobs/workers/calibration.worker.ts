/**
 * Worker-thread entry (piscina): one slice of a calibration grid search, one arm or two. Pure:
 * imports only lib/stats, so scripts/build-workers.mjs can bundle it into
 * .workers/calibration.worker.mjs for plain Node, outside the Next.js server bundle.
 */
import { calibrateSingleArm, type CalibrationOptions, type CalibrationResult } from "@/lib/stats/calibration";
import { calibrateTwoArm } from "@/lib/stats/calibration-two-arm";
import type { Design } from "@/lib/stats/types";
import { captureOutcome, type WorkerOutcome } from "./worker-errors";
import { lowerThisThreadPriority } from "./lower-priority";

lowerThisThreadPriority();

/** Functions (onProgress, shouldCancel) cannot cross a thread boundary; the job loop handles both per slice. */
export type CalibrationSliceTask = { design: Design; options: Omit<CalibrationOptions, "onProgress" | "shouldCancel"> };

/** The search for the design's number of arms. */
export function calibrateSlice(task: CalibrationSliceTask): CalibrationResult {
  return task.design.arms === "two" ? calibrateTwoArm(task.design, task.options) : calibrateSingleArm(task.design, task.options);
}

export default function calibrationSlice(task: CalibrationSliceTask): WorkerOutcome<CalibrationResult> {
  return captureOutcome(() => calibrateSlice(task));
}
