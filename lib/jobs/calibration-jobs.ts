import "server-only";
/**
 * In-memory registry of calibration searches (lib/stats/calibration.ts). A job runs one thetaT
 * value at a time, each slice in a worker thread (lib/jobs/pool.ts; in process when the worker
 * bundle is missing), so requests (progress polls, cancel, other pages) are answered while it
 * runs; a cancel takes effect at the next chunk. Jobs live only as long as the server process: a restart loses
 * them (the caller starts again). The registry sits on globalThis because route bundles may load
 * this module more than once.
 */
import { randomUUID } from "node:crypto";
import type { CalibratedDesign } from "@/lib/stats/calibration";
import type { SingleArmDesign } from "@/lib/stats/types";
import { runChunkedCalibration, type ChunkedCalibrationInput } from "./chunked-calibration";
import { runCalibrationSlice } from "./pool";
import { eventLoopWatcher, pauseBeforeNextSlice } from "./back-off";

export type CalibrationJobStatus = "running" | "done" | "cancelled" | "failed";

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
  error: string | null;
  cancelRequested: boolean;
};

type Registry = Map<string, CalibrationJob>;
const registry: Registry = ((globalThis as unknown as { cairnCalibrationJobs?: Registry }).cairnCalibrationJobs ??= new Map());

/** Finished jobs are kept this long for the page to fetch the results. */
const KEEP_FINISHED_MS = 30 * 60 * 1000;
/** Searches at once, per process: each one takes a share of the same CPU. */
export const MAX_RUNNING_JOBS = 2;

function prune(now = Date.now()) {
  for (const [id, j] of registry) if (j.finishedAt && now - Date.parse(j.finishedAt) > KEEP_FINISHED_MS) registry.delete(id);
}

export function runningJobCount(): number {
  let n = 0;
  for (const j of registry.values()) if (j.status === "running") n++;
  return n;
}

/** Starts a search and returns at once; the job record is updated as chunks complete. */
export function startCalibrationJob(args: { trialId: number; userId: number; design: SingleArmDesign } & Omit<ChunkedCalibrationInput, "design">): CalibrationJob {
  prune();
  const job: CalibrationJob = {
    id: randomUUID(),
    trialId: args.trialId,
    userId: args.userId,
    status: "running",
    progress: 0,
    startedAt: new Date().toISOString(),
    finishedAt: null,
    total: args.thetaTGrid.length * args.thetaLGrid.length * (args.thetaUGrid ? args.thetaUGrid.length : 1),
    evaluated: 0,
    feasible: 0,
    best: [],
    error: null,
    cancelRequested: false,
  };
  registry.set(job.id, job);
  const requestThreadUtilization = eventLoopWatcher();
  void runChunkedCalibration(
    { design: args.design, thetaTGrid: args.thetaTGrid, thetaLGrid: args.thetaLGrid, thetaUGrid: args.thetaUGrid, typeIErrorLimit: args.typeIErrorLimit, powerTarget: args.powerTarget, keep: args.keep },
    {
      calibrate: (design, options) => runCalibrationSlice({ design, options }),
      shouldCancel: () => job.cancelRequested,
      pauseAfter: (chunkMs) => pauseBeforeNextSlice(requestThreadUtilization(), chunkMs),
      onChunk: (s) => {
        job.progress = s.progress;
        job.evaluated = s.evaluated;
        job.feasible = s.feasible;
        job.best = s.best;
      },
    },
  ).then(
    (s) => {
      job.status = s.cancelled ? "cancelled" : "done";
      job.progress = s.progress;
      job.evaluated = s.evaluated;
      job.feasible = s.feasible;
      job.best = s.best;
      job.finishedAt = new Date().toISOString();
    },
    (e: unknown) => {
      job.status = "failed";
      job.error = e instanceof Error ? e.message : "The search failed.";
      job.finishedAt = new Date().toISOString();
      console.error("[cairn] calibration job failed", job.id, e);
    },
  );
  return job;
}

/** A job of this trial, or undefined (a job id from another trial is not revealed). */
export function getCalibrationJob(trialId: number, id: string): CalibrationJob | undefined {
  prune();
  const j = registry.get(id);
  return j && j.trialId === trialId ? j : undefined;
}

export function cancelCalibrationJob(trialId: number, id: string): CalibrationJob | undefined {
  const j = getCalibrationJob(trialId, id);
  if (j && j.status === "running") j.cancelRequested = true;
  return j;
}
