import type { CalibrationJob } from "./calibration-jobs";

/** The API shape of a calibration job (the cancel flag is internal). */
export function calibrationJobJson(j: CalibrationJob) {
  return {
    id: j.id,
    status: j.status === "running" && j.cancelRequested ? ("cancelling" as const) : j.status,
    progress: j.progress,
    startedAt: j.startedAt,
    finishedAt: j.finishedAt,
    total: j.total,
    evaluated: j.evaluated,
    feasible: j.feasible,
    best: j.best,
    error: j.error,
  };
}
export type CalibrationJobJson = ReturnType<typeof calibrationJobJson>;
