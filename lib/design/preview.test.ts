/**
 * Wiring of the two-arm type I error into the design preview: the number shown is the maximum on the
 * null boundary pT = pC + delta (checked against brute-force enumeration in
 * lib/stats/two-arm-error-rates.test.ts), not the value at pT = pC.
 */
import { describe, expect, it } from "vitest";
import { nullCurveStep, twoArmPreview } from "./preview";
import { twoArmBoundaries } from "@/lib/stats/boundaries";
import { exactTwoArmOperatingCharacteristics, TWO_ARM_NULL_CONTROL_RATES } from "@/lib/stats/operating-characteristics";
import type { TwoArmDesign } from "@/lib/stats/types";

const ni: TwoArmDesign = {
  arms: "two",
  priorT: { family: "uniform" },
  priorC: { family: "informative", mean: 0.35, ess: 8 },
  controlRate: 0.35,
  experimentalRate: 0.4,
  delta: -0.1,
  nMaxPerArm: 20,
  looks: { kind: "list", sizes: [10, 20] },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: null,
};

describe("two-arm design preview: type I error on the null boundary", () => {
  it("shows the maximum over control rates of P(declare success) at pT = pC + delta, and the value at the assumed control rate", () => {
    const p = twoArmPreview(ni);
    const b = twoArmBoundaries(ni).response;
    const atBoundary = exactTwoArmOperatingCharacteristics(b, 0.25, 0.35).pDeclareSuccess;
    const atEqual = exactTwoArmOperatingCharacteristics(b, 0.35, 0.35).pDeclareSuccess;
    expect(p.delta).toBe(-0.1);
    expect(p.nullPoint).toEqual({ controlRate: 0.35, experimentalRate: 0.25 });
    expect(p.typeIErrorAtControlRate).toBe(atBoundary);
    expect(p.atNull.pDeclareSuccess).toBe(atBoundary);
    expect(Math.abs(atEqual - atBoundary)).toBeGreaterThan(0.01);
    const brute = Math.max(...p.nullCurve.map((c) => exactTwoArmOperatingCharacteristics(b, c.experimentalRate, c.controlRate).pDeclareSuccess));
    expect(p.typeIError).toBe(brute);
    expect(p.nullCurve.find((c) => c.controlRate === p.typeIErrorMaxAt.controlRate)?.typeIError).toBe(p.typeIError);
    expect(p.controlRateRange).toEqual({ from: 0.15, to: 0.95 });
    expect(p.controlRateStep).toBe(0.05);
    expect(p.power).toBe(exactTwoArmOperatingCharacteristics(b, 0.4, 0.35).pDeclareSuccess);
  });
  it("uses every 0.1 above 100 per arm and every 0.05 up to 100", () => {
    expect(nullCurveStep(100)).toBe(0.05);
    expect(nullCurveStep(101)).toBe(0.1);
    expect(TWO_ARM_NULL_CONTROL_RATES[0]).toBe(0.05);
  });
});
