import "server-only";
/**
 * Calibration searches (lib/stats/calibration.ts) as jobs. A job runs in the web process that
 * received it, one thetaT value at a time, each slice in a worker thread (lib/jobs/pool.ts; in
 * process when the worker bundle is missing), so requests are answered while it runs. Its state
 * lives in the calibration_jobs table, because the page's progress polls and its cancel may reach
 * any of the web processes (scripts/serve.mjs): after every chunk the running process writes
 * progress, the best designs so far and a heartbeat, and reads back whether a cancel was asked
 * for, which takes effect at the next chunk. A job whose heartbeat stops (its process ended) is
 * reported as failed, and the caller starts again.
 */
import { randomUUID } from "node:crypto";
import type { Design } from "@/lib/stats/types";
import {
  fetchCalibrationJob,
  finishCalibrationJob,
  insertCalibrationJobIfRoom,
  pruneCalibrationJobs,
  recordCalibrationProgress,
  requestCalibrationCancel,
  type CalibrationProgressUpdate,
} from "@/db/queries/calibration-jobs";
import { HttpError } from "@/lib/http";
import { calibrationJobFromRow, STALE_AFTER_MS, storedResultsJson, type CalibrationJob } from "./calibration-job-json";
import { runChunkedCalibration, type ChunkedCalibrationInput, type ChunkedProgress } from "./chunked-calibration";
import { runCalibrationSlice } from "./pool";
import { eventLoopWatcher, pauseBeforeNextSlice } from "./back-off";

/** Searches at once on the whole server: each one takes a share of the same CPUs. */
export const MAX_RUNNING_JOBS = 2;
/** The running process touches its job at least this often (more often while chunks complete). */
const HEARTBEAT_MS = 5_000;
/** Finished jobs are kept this long for the page to fetch the results. */
const KEEP_MS = 24 * 60 * 60 * 1000;

const progressUpdate = (arms: Design["arms"]) => (s: ChunkedProgress): CalibrationProgressUpdate => ({
  progress: s.progress,
  evaluated: s.evaluated,
  feasible: s.feasible,
  bestJson: storedResultsJson({ arms, best: s.best, points: s.points }),
});

/**
 * Starts a search and returns the new job at once (429 when MAX_RUNNING_JOBS already run); the
 * search goes on in this process after the response.
 */
export async function startCalibrationJob(args: { trialId: number; userId: number; design: Design } & Omit<ChunkedCalibrationInput, "design">): Promise<CalibrationJob> {
  const now = new Date();
  await pruneCalibrationJobs(new Date(now.getTime() - KEEP_MS));
  const id = randomUUID();
  const total = args.thetaTGrid.length * args.thetaLGrid.length * (args.thetaUGrid ? args.thetaUGrid.length : 1);
  const admitted = await insertCalibrationJobIfRoom({ id, trialId: args.trialId, userId: args.userId, total, now }, MAX_RUNNING_JOBS, new Date(now.getTime() - STALE_AFTER_MS));
  if (!admitted) throw new HttpError(429, "Other calibrations are running on the server just now; try again in a minute.");

  const progressOf = progressUpdate(args.design.arms);
  let cancelRequested = false;
  // Progress writes go one after another, so a slow write never lands after a later one.
  let writes: Promise<void> = Promise.resolve();
  const touch = (p: CalibrationProgressUpdate | null) => {
    writes = writes
      .then(() => recordCalibrationProgress(id, p, new Date()))
      .then((cancel) => {
        cancelRequested ||= cancel;
      })
      .catch((e: unknown) => console.error("[cairn] could not record calibration progress", id, e));
  };
  const heartbeat = setInterval(() => touch(null), HEARTBEAT_MS);
  heartbeat.unref?.();
  const requestThreadUtilization = eventLoopWatcher();
  const finish = async (outcome: Parameters<typeof finishCalibrationJob>[1]) => {
    clearInterval(heartbeat);
    await writes;
    await finishCalibrationJob(id, outcome, new Date()).catch((e: unknown) => console.error("[cairn] could not record the end of calibration", id, e));
  };
  void runChunkedCalibration(
    { design: args.design, thetaTGrid: args.thetaTGrid, thetaLGrid: args.thetaLGrid, thetaUGrid: args.thetaUGrid, typeIErrorLimit: args.typeIErrorLimit, powerTarget: args.powerTarget, keep: args.keep },
    {
      calibrate: (design, options) => runCalibrationSlice({ design, options }),
      shouldCancel: () => cancelRequested,
      pauseAfter: (chunkMs) => pauseBeforeNextSlice(requestThreadUtilization(), chunkMs),
      onChunk: (s) => touch(progressOf(s)),
    },
  ).then(
    (s) => finish({ status: s.cancelled ? "cancelled" : "done", error: null, progress: progressOf(s) }),
    (e: unknown) => {
      console.error("[cairn] calibration job failed", id, e);
      return finish({ status: "failed", error: e instanceof Error ? e.message.slice(0, 500) : "The search failed." });
    },
  );
  return calibrationJobFromRow(
    { id, trial_id: args.trialId, user_id: args.userId, status: "running", progress: 0, total, evaluated: 0, feasible: 0, best_json: "[]", error: null, cancel_requested: false, started_at: now, heartbeat_at: now, finished_at: null },
    now,
  );
}

/** A job of this trial, or undefined (a job id from another trial is not revealed). */
export async function getCalibrationJob(trialId: number, id: string): Promise<CalibrationJob | undefined> {
  const row = await fetchCalibrationJob(trialId, id);
  return row && calibrationJobFromRow(row, new Date());
}

export async function cancelCalibrationJob(trialId: number, id: string): Promise<CalibrationJob | undefined> {
  await requestCalibrationCancel(trialId, id);
  return getCalibrationJob(trialId, id);
}
