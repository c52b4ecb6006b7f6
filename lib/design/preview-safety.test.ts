/**
 * Finding 9 on the design preview: early termination is split into futility and efficacy, and a
 * design with a safety rule carries the joint characteristics over a grid of true toxicity rates,
 * equal to the engine's own `operatingCharacteristicsWithSafety` (itself checked against brute-force
 * enumeration in lib/stats/oc-with-safety.test.ts).
 */
import { describe, expect, it } from "vitest";
import { singleArmPreview, twoArmPreview, toxicityGrid } from "./preview";
import { operatingCharacteristicsWithSafety } from "@/lib/stats/operating-characteristics";
import type { SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";

const single: SingleArmDesign = {
  arms: "single",
  prior: { family: "uniform" },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 30,
  looks: { kind: "every", first: 10, every: 10 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.95 },
  safety: { qmax: 0.3, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.85 },
};

describe("finding 9: design preview", () => {
  it("finding 9: curve points split early termination into futility and efficacy", () => {
    const p = singleArmPreview(single);
    for (const c of p.curve) expect(c.pEarlyFutility + c.pEarlyEfficacy).toBeCloseTo(c.pEarlyTermination, 15);
    expect(p.curve.some((c) => c.pEarlyEfficacy > 0.01)).toBe(true);
  });

  it("finding 9: the safety grid covers 0..0.6 and qmax, and equals the engine's joint characteristics", () => {
    const p = singleArmPreview(single);
    expect(p.safetyGrid).not.toBeNull();
    expect(p.safetyGrid!.map((r) => r.q)).toEqual(toxicityGrid(single));
    expect(p.safetyGrid!.map((r) => r.q)).toContain(0.3);
    const want = operatingCharacteristicsWithSafety(single, single.p1, toxicityGrid(single));
    p.safetyGrid!.forEach((r, i) => {
      expect(r.atTarget.pSafetyStop).toBe(want[i].pSafetyStop);
      expect(r.atTarget.pDeclareSuccess).toBe(want[i].pDeclareSuccess);
      expect(r.atTarget.expectedSampleSize).toBe(want[i].expectedSampleSize);
    });
    expect(singleArmPreview({ ...single, safety: null }).safetyGrid).toBeNull();
  });

  it("finding 9: a two-arm design with safety gets the grid too", () => {
    const two: TwoArmDesign = {
      arms: "two",
      priorT: { family: "uniform" },
      priorC: { family: "uniform" },
      controlRate: 0.3,
      experimentalRate: 0.5,
      delta: 0,
      nMaxPerArm: 20,
      looks: { kind: "every", first: 10, every: 5 },
      rule: { kind: "uncertainStandard", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: false, efficacyThreshold: null },
      safety: { kind: "uncertainStandard", standard: { a: 5, b: 20 }, margin: 0.1, prior: { family: "uniform" }, thetaS: 0.8 },
    };
    const p = twoArmPreview(two);
    const want = operatingCharacteristicsWithSafety(two, [0.3, 0.3], toxicityGrid(two));
    p.safetyGrid!.forEach((r, i) => expect(r.atNull.pSafetyStop).toBe(want[i].pSafetyStop));
    expect(p.safetyGrid![p.safetyGrid!.length - 1].atNull.pSafetyStop).toBeGreaterThan(0.5);
  });
});
