/**
 * Worker-thread entry (piscina): one slice of the calibration grid search. Pure: imports only
 * lib/stats, so scripts/build-workers.mjs can bundle it into .workers/calibration.worker.mjs for
 * plain Node, outside the Next.js server bundle.
 */
import { calibrateSingleArm, type CalibrationOptions, type CalibrationResult } from "@/lib/stats/calibration";
import type { SingleArmDesign } from "@/lib/stats/types";
import { captureOutcome, type WorkerOutcome } from "./worker-errors";
import { lowerThisThreadPriority } from "./lower-priority";

lowerThisThreadPriority();

/** Functions (onProgress, shouldCancel) cannot cross a thread boundary; the job loop handles both per slice. */
export type CalibrationSliceTask = { design: SingleArmDesign; options: Omit<CalibrationOptions, "onProgress" | "shouldCancel"> };

export default function calibrationSlice(task: CalibrationSliceTask): WorkerOutcome<CalibrationResult> {
  return captureOutcome(() => calibrateSingleArm(task.design, task.options));
}
