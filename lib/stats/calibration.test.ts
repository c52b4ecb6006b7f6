/**
 * Calibration by grid search. The fast path (shared PP tables, integer-bound recursion) is checked
 * against the plain path: the design-level exact operating characteristics recomputed for every
 * grid point with the thresholds written into the design.
 */
import { describe, expect, it } from "vitest";
import { calibrateSingleArm } from "./calibration";
import { typeIErrorAndPower } from "./operating-characteristics";
import type { SingleArmDesign } from "./types";
import { StatsDomainError } from "./validate";

const base: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 30,
  looks: { kind: "every", first: 5, every: 1 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: null,
};
const thetaTGrid = [0.8, 0.85, 0.9, 0.93, 0.95, 0.97];
const thetaLGrid = [0, 0.01, 0.05, 0.1, 0.2];

describe("calibrateSingleArm", () => {
  for (const kind of ["predictive", "posterior"] as const)
    it(`${kind} rule: every grid point equals the design-level exact OC, and the best design is the feasible one with smallest EN(p0)`, () => {
      const design = { ...base, rule: { ...base.rule, kind } };
      const r = calibrateSingleArm(design, { thetaTGrid, thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 0.8, keep: 3 });
      expect(r.total).toBe(30);
      expect(r.evaluated).toBe(30);
      expect(r.cancelled).toBe(false);
      let bestEN = Infinity;
      let feasible = 0;
      thetaTGrid.forEach((thetaT, iT) =>
        thetaLGrid.forEach((thetaL, iL) => {
          const plain = typeIErrorAndPower({ ...design, rule: { ...design.rule, thetaT, futilityThreshold: thetaL } });
          const i = iT * thetaLGrid.length + iL;
          expect(r.typeIError[i]).toBeCloseTo(plain.typeIError, 13);
          expect(r.power[i]).toBeCloseTo(plain.power, 13);
          expect(r.expectedSampleSizeNull[i]).toBeCloseTo(plain.atNull.expectedSampleSize, 11);
          if (plain.typeIError <= 0.1 && plain.power >= 0.8) {
            feasible++;
            bestEN = Math.min(bestEN, plain.atNull.expectedSampleSize);
          }
        }),
      );
      expect(r.feasible).toBe(feasible);
      expect(feasible).toBeGreaterThan(0);
      expect(r.best[0].expectedSampleSizeNull).toBeCloseTo(bestEN, 11);
      expect(r.best.length).toBe(Math.min(3, feasible));
      for (let k = 1; k < r.best.length; k++) expect(r.best[k].expectedSampleSizeNull).toBeGreaterThanOrEqual(r.best[k - 1].expectedSampleSizeNull);
    });

  it("searches thetaU when efficacy stopping is on, skipping pairs with thetaU <= thetaL", () => {
    const design = { ...base, rule: { ...base.rule, efficacyStopping: true, efficacyThreshold: 0.99 } };
    const r = calibrateSingleArm(design, { thetaTGrid: [0.9], thetaLGrid: [0.05, 0.5], thetaUGrid: [0.3, 0.95, 0.99], typeIErrorLimit: 0.2, powerTarget: 0.5 });
    expect(r.total).toBe(6);
    expect(r.evaluated).toBe(5);
    const plain = typeIErrorAndPower({ ...design, rule: { ...design.rule, futilityThreshold: 0.05, efficacyThreshold: 0.95 } });
    expect(r.typeIError[1]).toBeCloseTo(plain.typeIError, 13);
    expect(Number.isNaN(r.typeIError[3])).toBe(true);
  });

  it("reports progress up to 1 and stops early when asked to cancel", () => {
    const seen: number[] = [];
    calibrateSingleArm(base, { thetaTGrid, thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 0.8, onProgress: (f) => seen.push(f) });
    expect(seen[seen.length - 1]).toBe(1);
    for (let k = 1; k < seen.length; k++) expect(seen[k]).toBeGreaterThanOrEqual(seen[k - 1]);
    let polls = 0;
    const r = calibrateSingleArm(base, { thetaTGrid, thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 0.8, shouldCancel: () => ++polls > 7 });
    expect(r.cancelled).toBe(true);
    expect(r.evaluated).toBe(7);
  });

  const bad: [string, Parameters<typeof calibrateSingleArm>[1]][] = [
    ["thetaTGrid must be a non-empty array", { thetaTGrid: [], thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 0.8 }],
    ["grid thresholds must lie in [0, 1]", { thetaTGrid: [1.1], thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 0.8 }],
    ["typeIErrorLimit must lie strictly between 0 and 1", { thetaTGrid, thetaLGrid, typeIErrorLimit: 0, powerTarget: 0.8 }],
    ["powerTarget must lie strictly between 0 and 1", { thetaTGrid, thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 1 }],
    ["keep must be a positive integer", { thetaTGrid, thetaLGrid, typeIErrorLimit: 0.1, powerTarget: 0.8, keep: 0 }],
  ];
  for (const [title, opts] of bad) it(`rejects: ${title}`, () => expect(() => calibrateSingleArm(base, opts)).toThrow(StatsDomainError));
});
