/** Calibration jobs as the app sees them (from their calibration_jobs row) and as the API sends them. */
import type { CalibratedDesign } from "@/lib/stats/calibration";
import type { CalibrationJobRow } from "@/db/queries/calibration-jobs";
import type { SearchedPoint } from "./chunked-calibration";

/**
 * What best_json holds: the best designs, the searched (type I error, power) points for the chart and
 * the number of arms. Rows written before the two-arm search hold a bare array of best designs (one arm).
 */
type StoredResults = { arms: "single" | "two"; best: CalibratedDesign[]; points: SearchedPoint[] };

export function storedResultsJson(r: StoredResults): string {
  return JSON.stringify(r);
}

function parseStoredResults(json: string): StoredResults {
  const v = JSON.parse(json) as CalibratedDesign[] | StoredResults;
  if (Array.isArray(v)) return { arms: "single", best: v, points: [] };
  return { arms: v.arms === "two" ? "two" : "single", best: Array.isArray(v.best) ? v.best : [], points: Array.isArray(v.points) ? v.points : [] };
}

type CalibrationJobStatus = "running" | "done" | "cancelled" | "failed";

export type CalibrationJob = {
  id: string;
  trialId: number;
  userId: number;
  status: CalibrationJobStatus;
  /** Fraction of the grid searched, in [0, 1]. */
  progress: number;
  startedAt: string;
  finishedAt: string | null;
  total: number;
  evaluated: number;
  feasible: number;
  best: CalibratedDesign[];
  /** Distinct (type I error, power) pairs of the grid points searched so far, for the results chart. */
  points: SearchedPoint[];
  arms: "single" | "two";
  error: string | null;
  cancelRequested: boolean;
};

/** A running job not touched for this long belongs to a process that ended. */
export const STALE_AFTER_MS = 30_000;
export const ABANDONED_MESSAGE = "The server process running this search stopped before it finished; start the search again.";

/** The job as callers see it; pure, so the staleness rule is unit-tested. */
export function calibrationJobFromRow(r: CalibrationJobRow, now: Date): CalibrationJob {
  const stored = parseStoredResults(r.best_json);
  const abandoned = r.status === "running" && now.getTime() - new Date(r.heartbeat_at).getTime() > STALE_AFTER_MS;
  return {
    id: r.id,
    trialId: r.trial_id,
    userId: r.user_id,
    status: abandoned ? "failed" : r.status,
    progress: Number(r.progress),
    startedAt: new Date(r.started_at).toISOString(),
    finishedAt: r.finished_at ? new Date(r.finished_at).toISOString() : abandoned ? new Date(r.heartbeat_at).toISOString() : null,
    total: r.total,
    evaluated: r.evaluated,
    feasible: r.feasible,
    best: stored.best,
    points: stored.points,
    arms: stored.arms,
    error: abandoned ? ABANDONED_MESSAGE : r.error,
    cancelRequested: !!r.cancel_requested,
  };
}

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
    points: j.points,
    arms: j.arms,
    error: j.error,
  };
}
export type CalibrationJobJson = ReturnType<typeof calibrationJobJson>;
