import "server-only";
/**
 * Calibration jobs shared by every web process (lib/jobs/calibration-jobs.ts keeps the rules).
 * Rows carry design-search results only, never trial data.
 */
import { db, writeTransaction, type Tx } from "../knex";

export type CalibrationJobRow = {
  id: string;
  trial_id: number;
  user_id: number;
  status: "running" | "done" | "cancelled" | "failed";
  progress: number;
  total: number;
  evaluated: number;
  feasible: number;
  best_json: string;
  error: string | null;
  cancel_requested: number | boolean;
  started_at: Date;
  heartbeat_at: Date;
  finished_at: Date | null;
};

type NewCalibrationJob = { id: string; trialId: number; userId: number; total: number; now: Date };

/**
 * Inserts a running job unless `maxRunning` live jobs (heartbeat after `liveSince`) already run.
 * A named lock makes count-then-insert atomic across processes. Returns false when refused.
 */
export async function insertCalibrationJobIfRoom(job: NewCalibrationJob, maxRunning: number, liveSince: Date): Promise<boolean> {
  return writeTransaction(async (tx) => {
    await tx.raw("SELECT GET_LOCK('cairn_calibration_start', 10)");
    try {
      const [{ n }] = (await tx("calibration_jobs").where({ status: "running" }).andWhere("heartbeat_at", ">", liveSince).count({ n: "*" })) as { n: number }[];
      if (Number(n) >= maxRunning) return false;
      await tx("calibration_jobs").insert({
        id: job.id,
        trial_id: job.trialId,
        user_id: job.userId,
        status: "running",
        total: job.total,
        best_json: "[]",
        started_at: job.now,
        heartbeat_at: job.now,
      });
      return true;
    } finally {
      await tx.raw("SELECT RELEASE_LOCK('cairn_calibration_start')");
    }
  });
}

export type CalibrationProgressUpdate = { progress: number; evaluated: number; feasible: number; bestJson: string };

const progressColumns = (p: CalibrationProgressUpdate) => ({ progress: p.progress, evaluated: p.evaluated, feasible: p.feasible, best_json: p.bestJson });

/** Records progress and a heartbeat; answers whether a cancel has been asked for. */
export async function recordCalibrationProgress(id: string, p: CalibrationProgressUpdate | null, now: Date): Promise<boolean> {
  await db("calibration_jobs")
    .where({ id, status: "running" })
    .update({ ...(p ? progressColumns(p) : {}), heartbeat_at: now });
  const row = (await db("calibration_jobs").where({ id }).first("cancel_requested")) as { cancel_requested: number } | undefined;
  return !!row?.cancel_requested;
}

export async function finishCalibrationJob(
  id: string,
  outcome: { status: "done" | "cancelled" | "failed"; error: string | null; progress?: CalibrationProgressUpdate },
  now: Date,
): Promise<void> {
  await db("calibration_jobs")
    .where({ id, status: "running" })
    .update({
      status: outcome.status,
      error: outcome.error,
      finished_at: now,
      heartbeat_at: now,
      ...(outcome.progress ? progressColumns(outcome.progress) : {}),
    });
}

export async function fetchCalibrationJob(trialId: number, id: string): Promise<CalibrationJobRow | undefined> {
  return db("calibration_jobs").where({ id, trial_id: trialId }).first();
}

/** Asks a running job of this trial to stop; the running process sees it at its next chunk. */
export async function requestCalibrationCancel(trialId: number, id: string): Promise<void> {
  await db("calibration_jobs").where({ id, trial_id: trialId, status: "running" }).update({ cancel_requested: true });
}

/** Deletes finished jobs, and abandoned ones, last touched before `before`. */
export async function pruneCalibrationJobs(before: Date, tx: Tx = db): Promise<number> {
  return tx("calibration_jobs").where("heartbeat_at", "<", before).del();
}
