import { describe, expect, it } from "vitest";
import { calibrateSingleArm } from "@/lib/stats/calibration";
import { typeIErrorAndPower } from "@/lib/stats/operating-characteristics";
import type { SingleArmDesign } from "@/lib/stats/types";
import { groupByCharacteristics } from "./calibration-groups";

const design: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 25,
  looks: { kind: "every", first: 10, every: 5 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: null,
};

describe("groupByCharacteristics", () => {
  it("puts threshold sets with the same exact operating characteristics in one group, and different ones apart", () => {
    // A fine thetaL grid at 25 patients: neighbouring values cut the same futility counts.
    const thetaLGrid = Array.from({ length: 21 }, (_, i) => i * 0.005);
    const r = calibrateSingleArm(design, { thetaTGrid: [0.85, 0.9], thetaLGrid, typeIErrorLimit: 0.3, powerTarget: 0.5, keep: 40 });
    const groups = groupByCharacteristics(r.best);
    expect(groups.length).toBeLessThan(r.best.length);
    expect(groups.reduce((s, g) => s + g.thresholds.length, 0)).toBe(r.best.length);
    for (const g of groups) {
      // Brute force: the engine's design-level evaluation of every member equals the group's.
      for (const t of g.thresholds) {
        const oc = typeIErrorAndPower({ ...design, rule: { ...design.rule, thetaT: t.thetaT, futilityThreshold: t.thetaL } });
        expect(oc.typeIError).toBeCloseTo(g.design.typeIError, 12);
        expect(oc.power).toBeCloseTo(g.design.power, 12);
      }
    }
    for (let i = 1; i < groups.length; i++) {
      const [u, v] = [groups[i - 1].design, groups[i].design];
      expect(Math.abs(u.typeIError - v.typeIError) + Math.abs(u.power - v.power) + Math.abs(u.expectedSampleSizeNull - v.expectedSampleSizeNull)).toBeGreaterThan(1e-9);
    }
  });

  it("keeps the search's order and leaves a list without ties alone", () => {
    const a = { thetaT: 0.9, thetaL: 0, thetaU: null, typeIError: 0.05, power: 0.8, expectedSampleSizeNull: 20, expectedSampleSizeTarget: 25, pEarlyTerminationNull: 0.5, pEarlyFutilityNull: 0.5, pEarlyEfficacyNull: 0 };
    const b = { ...a, thetaL: 0.1, expectedSampleSizeNull: 21 };
    expect(groupByCharacteristics([a, b]).map((g) => g.thresholds)).toEqual([[{ thetaT: 0.9, thetaL: 0, thetaU: null }], [{ thetaT: 0.9, thetaL: 0.1, thetaU: null }]]);
  });
});
