/**
 * Calibration jobs kept in MariaDB, so that any web process can answer a progress poll or a cancel
 * for a search running in another: results equal one search over the whole grid, admission is
 * counted across the server, a cancel recorded in the table stops the search, and a job whose
 * process ended is reported as failed.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { randomUUID } from "node:crypto";
import { db } from "@/db/knex";
import { calibrateSingleArm } from "@/lib/stats/calibration";
import type { TwoArmDesign } from "@/lib/stats/types";
import { cancelCalibrationJob, getCalibrationJob, MAX_RUNNING_JOBS, startCalibrationJob } from "@/lib/jobs/calibration-jobs";
import { ABANDONED_MESSAGE, STALE_AFTER_MS } from "@/lib/jobs/calibration-job-json";
import { HttpError } from "@/lib/http";
import { makeTrial, makeUser, resetDatabase } from "./support/db";
import { smallDesign, smallGrid, smallTwoArmDesign, smallTwoArmGrid } from "@/lib/jobs/test-design";
import { calibrateTwoArm } from "@/lib/stats/calibration-two-arm";

const design = smallDesign;
const grid = smallGrid;

let trialId: number;
let otherTrialId: number;
let userId: number;

beforeAll(async () => {
  await resetDatabase();
  trialId = await makeTrial();
  otherTrialId = await makeTrial();
  userId = (await makeUser()).id;
});
afterAll(async () => {
  await db.destroy();
});

async function until<T>(read: () => Promise<T>, done: (v: T) => boolean, ms = 30_000): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await read();
    if (done(v)) return v;
    if (Date.now() - t0 > ms) throw new Error(`not within ${ms} ms: ${JSON.stringify(v)}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

async function insertRunning(heartbeatAt: Date): Promise<string> {
  const id = randomUUID();
  await db("calibration_jobs").insert({ id, trial_id: trialId, user_id: userId, status: "running", total: 10, best_json: "[]", started_at: heartbeatAt, heartbeat_at: heartbeatAt });
  return id;
}

describe("calibration jobs in MariaDB", () => {
  it("records progress and ends with the same best designs as one search over the whole grid", async () => {
    const started = await startCalibrationJob({ trialId, userId, design, ...grid });
    expect(started.status).toBe("running");
    expect(started.total).toBe(4 * 3 * 2);
    const done = await until(() => getCalibrationJob(trialId, started.id), (j) => j?.status !== "running");
    const whole = calibrateSingleArm(design, grid);
    expect(done).toMatchObject({ status: "done", progress: 1, evaluated: whole.evaluated, feasible: whole.feasible, error: null });
    expect(done!.best).toEqual(whole.best);
    expect(done!.finishedAt).not.toBeNull();
  });

  it("runs a two-arm search to the same best designs as one search over the whole grid, with its chart points", async () => {
    const started = await startCalibrationJob({ trialId, userId, design: smallTwoArmDesign, ...smallTwoArmGrid });
    expect(started.total).toBe(3 * 3 * 2);
    const done = await until(() => getCalibrationJob(trialId, started.id), (j) => j?.status !== "running");
    const whole = calibrateTwoArm(smallTwoArmDesign, smallTwoArmGrid);
    expect(done).toMatchObject({ status: "done", arms: "two", progress: 1, evaluated: whole.evaluated, feasible: whole.feasible, error: null });
    expect(done!.best).toEqual(JSON.parse(JSON.stringify(whole.best)));
    expect(done!.points.length).toBeGreaterThan(0);
    expect(done!.points.length).toBeLessThanOrEqual(whole.evaluated);
  });

  it("does not reveal a job to another trial", async () => {
    const j = await startCalibrationJob({ trialId, userId, design, ...grid });
    expect(await getCalibrationJob(otherTrialId, j.id)).toBeUndefined();
    expect(await cancelCalibrationJob(otherTrialId, j.id)).toBeUndefined();
    expect(await getCalibrationJob(trialId, "not-a-job")).toBeUndefined();
    await until(() => getCalibrationJob(trialId, j.id), (v) => v?.status === "done");
  });

  it("stops at the next chunk after a cancel recorded in the table, keeping what it found", async () => {
    // A search the engine needs seconds for (two arms, 100 per arm, 40 x 40 thresholds; about 10 s of
    // CPU in npm run bench), cut into 40 slices: the cancel lands after the first slice, tens of
    // slices before the end, whatever the machine's speed (the single-arm searches now take milliseconds).
    const heavy: TwoArmDesign = {
      ...smallTwoArmDesign,
      controlRate: 0.3,
      experimentalRate: 0.5,
      nMaxPerArm: 100,
      looks: { kind: "every", first: 10, every: 10 },
      rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
    };
    const steps = (from: number) => Array.from({ length: 40 }, (_, i) => Math.round((from + i * 0.005) * 1e9) / 1e9);
    const j = await startCalibrationJob({ trialId, userId, design: heavy, thetaTGrid: steps(0.8), thetaLGrid: steps(0), thetaUGrid: null, typeIErrorLimit: 0.1, powerTarget: 0.8, keep: 4 });
    await until(() => getCalibrationJob(trialId, j.id), (v) => (v?.evaluated ?? 0) > 0);
    const asked = await cancelCalibrationJob(trialId, j.id);
    expect(asked?.cancelRequested).toBe(true);
    const ended = await until(() => getCalibrationJob(trialId, j.id), (v) => v?.status !== "running");
    expect(ended?.status).toBe("cancelled");
    expect(ended!.progress).toBeLessThan(1);
    expect(ended!.evaluated).toBeGreaterThan(0);
  });

  it(`admits at most ${MAX_RUNNING_JOBS} live searches on the whole server; abandoned ones do not count`, async () => {
    const live = await Promise.all(Array.from({ length: MAX_RUNNING_JOBS }, () => insertRunning(new Date())));
    const refused = await startCalibrationJob({ trialId, userId, design, ...grid }).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(HttpError);
    expect((refused as HttpError).status).toBe(429);
    expect(await db("calibration_jobs").where({ status: "running" }).count({ n: "*" })).toEqual([{ n: MAX_RUNNING_JOBS }]);

    // The same rows with a heartbeat older than STALE_AFTER_MS: their processes have ended.
    await db("calibration_jobs").whereIn("id", live).update({ heartbeat_at: new Date(Date.now() - STALE_AFTER_MS - 1000) });
    const admitted = await startCalibrationJob({ trialId, userId, design, ...grid });
    await until(() => getCalibrationJob(trialId, admitted.id), (v) => v?.status === "done");
  });

  it("reports a running job whose process stopped touching it as failed", async () => {
    const id = await insertRunning(new Date(Date.now() - STALE_AFTER_MS - 1000));
    const j = await getCalibrationJob(trialId, id);
    expect(j).toMatchObject({ status: "failed", error: ABANDONED_MESSAGE });
  });
});
