/**
 * The two-arm threshold search against a direct exact evaluation: for every grid point, the
 * design-level twoArmTypeIErrorAndPower (boundaries from twoArmBoundaries, recursion
 * exactTwoArmOperatingCharacteristics) with the grid's thresholds written into the design. The best
 * list is checked against brute force: filter and sort those direct evaluations.
 */
import { describe, expect, it } from "vitest";
import { calibrateTwoArm, twoArmNullControlRates } from "./calibration-two-arm";
import { twoArmTypeIErrorAndPower, TWO_ARM_NULL_CONTROL_RATES } from "./operating-characteristics";
import type { TwoArmDesign } from "./types";
import { StatsDomainError } from "./validate";

const base: TwoArmDesign = {
  arms: "two",
  priorT: { family: "beta", a: 0.5, b: 0.5 },
  priorC: { family: "uniform" },
  controlRate: 0.3,
  experimentalRate: 0.6,
  delta: 0,
  nMaxPerArm: 20,
  looks: { kind: "every", first: 8, every: 4 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};
// Few control rates keep the direct evaluation quick; the search is told to use the same ones.
const controlRates = [0.1, 0.3, 0.5, 0.7];
const thetaTGrid = [0.85, 0.9, 0.95];
const thetaLGrid = [0, 0.05, 0.15];
const thetaUGrid = [0.1, 0.97, 0.995];

function direct(design: TwoArmDesign, thetaT: number, thetaL: number, thetaU: number | null) {
  return twoArmTypeIErrorAndPower({ ...design, rule: { ...design.rule, thetaT, futilityThreshold: thetaL, efficacyThreshold: thetaU } }, { controlRates });
}

describe("calibrateTwoArm", () => {
  for (const [kind, delta] of [
    ["predictive", 0],
    ["posterior", 0.05],
    ["predictive", -0.1],
  ] as const)
    it(`${kind} rule, margin ${delta}: every grid point and the best designs equal the direct exact evaluation`, () => {
      const design: TwoArmDesign = { ...base, delta, rule: { ...base.rule, kind } };
      const r = calibrateTwoArm(design, { thetaTGrid, thetaLGrid, thetaUGrid, typeIErrorLimit: 0.2, powerTarget: 0.5, keep: 4, controlRates });
      expect(r.total).toBe(27);
      expect(r.cancelled).toBe(false);
      const feasible: { thetaT: number; thetaL: number; thetaU: number; en: number; power: number; t1e: number; pet: number }[] = [];
      let skipped = 0;
      thetaTGrid.forEach((thetaT, iT) =>
        thetaLGrid.forEach((thetaL, iL) =>
          thetaUGrid.forEach((thetaU, iU) => {
            const i = (iT * thetaLGrid.length + iL) * thetaUGrid.length + iU;
            if (!(thetaU > thetaL)) {
              skipped++;
              expect(Number.isNaN(r.typeIError[i])).toBe(true);
              return;
            }
            const plain = direct(design, thetaT, thetaL, thetaU);
            expect(r.typeIError[i]).toBeCloseTo(plain.typeIError, 12);
            expect(r.power[i]).toBeCloseTo(plain.power, 12);
            expect(r.expectedSampleSizeNull[i]).toBeCloseTo(plain.atNull.expectedSampleSize, 10);
            if (plain.typeIError <= 0.2 && plain.power >= 0.5)
              feasible.push({ thetaT, thetaL, thetaU, en: plain.atNull.expectedSampleSize, power: plain.power, t1e: plain.typeIError, pet: plain.atNull.pEarlyTermination });
          }),
        ),
      );
      expect(r.evaluated).toBe(27 - skipped);
      expect(r.feasible).toBe(feasible.length);
      // The grid must offer a real choice, or the ordering check below proves nothing.
      expect(feasible.length).toBeGreaterThan(4);
      feasible.sort((u, v) => u.en - v.en || v.power - u.power);
      expect(r.best).toHaveLength(4);
      r.best.forEach((b, j) => {
        expect(b.expectedSampleSizeNull).toBeCloseTo(feasible[j].en, 10);
        const plain = direct(design, b.thetaT, b.thetaL, b.thetaU);
        expect(b.typeIError).toBeCloseTo(plain.typeIError, 12);
        expect(b.typeIErrorMaxAt).toEqual(plain.typeIErrorMaxAt);
        expect(b.power).toBeCloseTo(plain.power, 12);
        expect(b.expectedSampleSizeTarget).toBeCloseTo(plain.atTarget.expectedSampleSize, 10);
        expect(b.pEarlyTerminationNull).toBeCloseTo(plain.atNull.pEarlyTermination, 12);
        expect(b.pEarlyFutilityNull + b.pEarlyEfficacyNull).toBeCloseTo(b.pEarlyTerminationNull, 12);
      });
    });

  it("without efficacy stopping, searches (thetaT, thetaL) only and agrees with the direct evaluation at the default control rates", () => {
    const design: TwoArmDesign = { ...base, nMaxPerArm: 16, rule: { ...base.rule, efficacyStopping: false, efficacyThreshold: null } };
    const r = calibrateTwoArm(design, { thetaTGrid: [0.8, 0.9], thetaLGrid: [0, 0.1], typeIErrorLimit: 0.3, powerTarget: 0.3, keep: 10 });
    expect(r.grid.thetaU).toBeNull();
    expect(r.evaluated).toBe(4);
    for (const b of r.best) {
      const plain = twoArmTypeIErrorAndPower({ ...design, rule: { ...design.rule, thetaT: b.thetaT, futilityThreshold: b.thetaL } });
      expect(b.typeIError).toBeCloseTo(plain.typeIError, 12);
      expect(b.power).toBeCloseTo(plain.power, 12);
    }
    expect(r.best.length).toBeGreaterThan(0);
  });

  it("uses the control rates of twoArmErrorRatesFromBoundaries (assumed rate added, pairs leaving (0, 1) dropped)", () => {
    expect(twoArmNullControlRates({ delta: 0, controlRate: 0.33 })).toEqual([...TWO_ARM_NULL_CONTROL_RATES, 0.33].sort((u, v) => u - v));
    // pC + 0.2 must stay below 1: 0.8 and above are dropped.
    expect(twoArmNullControlRates({ delta: 0.2, controlRate: 0.3 })).toEqual(TWO_ARM_NULL_CONTROL_RATES.filter((r) => r < 0.8));
  });

  it("stops at the first cancel poll after the first progress report, with only that thetaT's points evaluated", () => {
    let progressReports = 0;
    const r = calibrateTwoArm(base, {
      thetaTGrid,
      thetaLGrid,
      thetaUGrid,
      typeIErrorLimit: 0.2,
      powerTarget: 0.5,
      controlRates,
      onProgress: () => progressReports++,
      shouldCancel: () => progressReports > 0,
    });
    expect(r.cancelled).toBe(true);
    expect(progressReports).toBe(1);
    // The first thetaT's 9 (thetaL, thetaU) pairs, minus the one with thetaU <= thetaL (0.1 vs 0.15).
    expect(r.evaluated).toBe(8);
    expect(Number.isNaN(r.typeIError[9])).toBe(true);
  });

  it("rejects an empty grid, a threshold outside [0, 1] and a one-arm design", () => {
    expect(() => calibrateTwoArm(base, { thetaTGrid: [], thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 0.8 })).toThrow(StatsDomainError);
    expect(() => calibrateTwoArm(base, { thetaTGrid, thetaLGrid: [1.2], typeIErrorLimit: 0.1, powerTarget: 0.8 })).toThrow(StatsDomainError);
    expect(() => calibrateTwoArm(base, { thetaTGrid, thetaLGrid, typeIErrorLimit: 0, powerTarget: 0.8 })).toThrow(StatsDomainError);
    expect(() => calibrateTwoArm({ ...base, arms: "single" } as unknown as TwoArmDesign, { thetaTGrid, thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 0.8 })).toThrow(StatsDomainError);
  });
});
