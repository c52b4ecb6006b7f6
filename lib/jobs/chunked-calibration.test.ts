import { describe, expect, it } from "vitest";
import { calibrateSingleArm } from "@/lib/stats/calibration";
import type { SingleArmDesign } from "@/lib/stats/types";
import { runChunkedCalibration } from "./chunked-calibration";

const design: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 30,
  looks: { kind: "every", first: 10, every: 5 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};
const grid = { thetaTGrid: [0.8, 0.85, 0.9, 0.95], thetaLGrid: [0, 0.05, 0.1], thetaUGrid: [0.95, 0.99], typeIErrorLimit: 0.15, powerTarget: 0.75, keep: 4 };

describe("runChunkedCalibration", () => {
  it("finds the same best designs, in the same order, as one search over the whole grid", async () => {
    const whole = calibrateSingleArm(design, grid);
    const progress: number[] = [];
    const chunked = await runChunkedCalibration({ design, ...grid }, { calibrate: calibrateSingleArm, shouldCancel: () => false, onChunk: (p) => progress.push(p.progress) });
    expect(whole.best.length).toBeGreaterThan(0);
    expect(chunked.best).toEqual(whole.best);
    expect(chunked.evaluated).toBe(whole.evaluated);
    expect(chunked.feasible).toBe(whole.feasible);
    expect(progress).toEqual([0.25, 0.5, 0.75, 1]);
  });

  it("stops at the next chunk when cancelled, keeping what it found", async () => {
    let chunks = 0;
    const r = await runChunkedCalibration({ design, ...grid }, { calibrate: calibrateSingleArm, shouldCancel: () => chunks >= 2, onChunk: () => chunks++ });
    expect(r.cancelled).toBe(true);
    expect(r.progress).toBe(0.5);
    // Two thetaT chunks of 3 thetaL x 2 thetaU points (every thetaU here is above every thetaL).
    expect(r.evaluated).toBe(2 * 3 * 2);
  });

  it("waits the pause asked for between chunks, and none after the last", async () => {
    const asked: number[] = [];
    const t0 = performance.now();
    await runChunkedCalibration({ design, ...grid }, { calibrate: calibrateSingleArm, shouldCancel: () => false, pauseAfter: (ms) => (asked.push(ms), 40) });
    expect(asked).toHaveLength(grid.thetaTGrid.length - 1);
    expect(asked.every((ms) => ms >= 0)).toBe(true);
    expect(performance.now() - t0).toBeGreaterThanOrEqual(3 * 40 - 5);
  });
});
