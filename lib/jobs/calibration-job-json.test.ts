import { describe, expect, it } from "vitest";
import type { CalibrationJobRow } from "@/db/queries/calibration-jobs";
import { ABANDONED_MESSAGE, calibrationJobFromRow, calibrationJobJson, STALE_AFTER_MS, storedResultsJson } from "./calibration-job-json";

const t0 = new Date("2026-12-02T10:00:00.000Z");
const row = (over: Partial<CalibrationJobRow> = {}): CalibrationJobRow => ({
  id: "00000000-0000-4000-8000-000000000001",
  trial_id: 7,
  user_id: 3,
  status: "running",
  progress: 0.25,
  total: 1600,
  evaluated: 400,
  feasible: 12,
  best_json: JSON.stringify([{ thetaT: 0.9, thetaL: 0.05, thetaU: null, typeIError: 0.08, power: 0.83, expectedSampleSizeNull: 21.5, expectedSampleSizeTarget: 38.2, pEarlyTerminationNull: 0.7 }]),
  error: null,
  cancel_requested: 0,
  started_at: t0,
  heartbeat_at: t0,
  finished_at: null,
  ...over,
});

describe("calibrationJobFromRow", () => {
  it("reads a live running job as it was recorded", () => {
    const j = calibrationJobFromRow(row(), new Date(t0.getTime() + STALE_AFTER_MS));
    expect(j).toMatchObject({ status: "running", progress: 0.25, evaluated: 400, feasible: 12, error: null, finishedAt: null, cancelRequested: false });
    expect(j.best[0].thetaT).toBe(0.9);
  });

  it("reports a running job whose heartbeat stopped as failed, keeping what it had found", () => {
    const j = calibrationJobFromRow(row(), new Date(t0.getTime() + STALE_AFTER_MS + 1));
    expect(j.status).toBe("failed");
    expect(j.error).toBe(ABANDONED_MESSAGE);
    expect(j.finishedAt).toBe(t0.toISOString());
    expect(j.best).toHaveLength(1);
  });

  it("never turns a finished job into a failed one, however old", () => {
    const done = row({ status: "done", progress: 1, finished_at: t0 });
    expect(calibrationJobFromRow(done, new Date(t0.getTime() + 10 * STALE_AFTER_MS)).status).toBe("done");
  });

  it("shows a running job with a cancel request as cancelling", () => {
    const j = calibrationJobFromRow(row({ cancel_requested: 1 }), t0);
    expect(calibrationJobJson(j).status).toBe("cancelling");
    expect(calibrationJobJson({ ...j, status: "cancelled" }).status).toBe("cancelled");
  });
});

describe("stored results", () => {
  it("reads a row written before the two-arm search (a bare array) as one-arm results without chart points", () => {
    const j = calibrationJobFromRow(row(), t0);
    expect(j.arms).toBe("single");
    expect(j.points).toEqual([]);
    expect(j.best[0].thetaT).toBe(0.9);
  });

  it("round-trips the arms, best designs and chart points of a two-arm search", () => {
    const best = JSON.parse(row().best_json);
    const j = calibrationJobFromRow(row({ best_json: storedResultsJson({ arms: "two", best, points: [[0.05, 0.81], [0.1, 0.9]] }) }), t0);
    expect(j.arms).toBe("two");
    expect(j.best).toEqual(best);
    expect(calibrationJobJson(j).points).toEqual([[0.05, 0.81], [0.1, 0.9]]);
  });
});
