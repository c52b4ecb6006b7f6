import { describe, expect, it } from "vitest";
import { calibrateSingleArm, type CalibrationOptions } from "@/lib/stats/calibration";
import { calibrateTwoArm } from "@/lib/stats/calibration-two-arm";
import type { Design } from "@/lib/stats/types";
import { runChunkedCalibration } from "./chunked-calibration";
import { calibrateSlice } from "./workers/calibration.worker";
import { smallDesign, smallGrid, smallTwoArmDesign, smallTwoArmGrid } from "@/lib/jobs/test-design";

const calibrate = (design: Design, options: CalibrationOptions) => calibrateSlice({ design, options });

const design = smallDesign;
const grid = smallGrid;

describe("runChunkedCalibration", () => {
  it("finds the same best designs, in the same order, as one search over the whole grid", async () => {
    const whole = calibrateSingleArm(design, grid);
    const progress: number[] = [];
    const chunked = await runChunkedCalibration({ design, ...grid }, { calibrate, shouldCancel: () => false, onChunk: (p) => progress.push(p.progress) });
    expect(whole.best.length).toBeGreaterThan(0);
    expect(chunked.best).toEqual(whole.best);
    expect(chunked.evaluated).toBe(whole.evaluated);
    expect(chunked.feasible).toBe(whole.feasible);
    expect(progress).toEqual([0.25, 0.5, 0.75, 1]);
  });

  it("stops at the next chunk when cancelled, keeping what it found", async () => {
    let chunks = 0;
    const r = await runChunkedCalibration({ design, ...grid }, { calibrate, shouldCancel: () => chunks >= 2, onChunk: () => chunks++ });
    expect(r.cancelled).toBe(true);
    expect(r.progress).toBe(0.5);
    // Two thetaT chunks of 3 thetaL x 2 thetaU points (every thetaU here is above every thetaL).
    expect(r.evaluated).toBe(2 * 3 * 2);
  });

  it("waits the pause asked for between chunks, and none after the last", async () => {
    const asked: number[] = [];
    const t0 = performance.now();
    await runChunkedCalibration({ design, ...grid }, { calibrate, shouldCancel: () => false, pauseAfter: (ms) => (asked.push(ms), 40) });
    expect(asked).toHaveLength(grid.thetaTGrid.length - 1);
    expect(asked.every((ms) => ms >= 0)).toBe(true);
    expect(performance.now() - t0).toBeGreaterThanOrEqual(3 * 40 - 5);
  });

  it("two arms: chunks of one (thetaT, thetaU) pair give the best designs and chart points of one search over the whole grid", async () => {
    const whole = calibrateTwoArm(smallTwoArmDesign, smallTwoArmGrid);
    const progress: number[] = [];
    const chunked = await runChunkedCalibration({ design: smallTwoArmDesign, ...smallTwoArmGrid }, { calibrate, shouldCancel: () => false, onChunk: (p) => progress.push(p.progress) });
    expect(whole.best.length).toBeGreaterThan(0);
    expect(chunked.best).toEqual(whole.best);
    expect(chunked.evaluated).toBe(whole.evaluated);
    expect(chunked.feasible).toBe(whole.feasible);
    // 3 thetaT x 2 thetaU chunks.
    expect(progress).toHaveLength(6);
    const expectedPoints = new Set<string>();
    whole.typeIError.forEach((t, i) => expectedPoints.add(`${Math.round(t * 1e4) / 1e4}:${Math.round(whole.power[i] * 1e4) / 1e4}`));
    expect(new Set(chunked.points.map(([t, p]) => `${t}:${p}`))).toEqual(expectedPoints);
  });

  it("two arms: a cancel asked for at the first progress report ends the search before the next chunk runs", async () => {
    let chunksRun = 0;
    let cancel = false;
    const r = await runChunkedCalibration(
      { design: smallTwoArmDesign, ...smallTwoArmGrid },
      {
        calibrate: (d, o) => (chunksRun++, calibrate(d, o)),
        shouldCancel: () => cancel,
        onChunk: () => {
          cancel = true;
        },
      },
    );
    expect(r.cancelled).toBe(true);
    expect(chunksRun).toBe(1);
    expect(r.evaluated).toBe(3);
  });
});
