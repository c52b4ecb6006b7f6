import { describe, expect, it } from "vitest";
import { calibrateSingleArm } from "@/lib/stats/calibration";
import { runChunkedCalibration } from "./chunked-calibration";
import { smallDesign, smallGrid } from "@/lib/jobs/test-design";

const design = smallDesign;
const grid = smallGrid;

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
