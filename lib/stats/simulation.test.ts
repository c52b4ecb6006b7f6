/**
 * Monte Carlo cross-check of the exact recursion. The simulator decides with `decideAtLook` at
 * every planned look, so an error in the boundary table or in the recursion would show here.
 * Agreement is required within 4 Monte Carlo standard errors (a false alarm about once in 16,000
 * comparisons; the seeds are fixed, so the outcome is reproducible).
 */
import { describe, expect, it } from "vitest";
import { mulberry32, simulateBoundaryTable, simulateSingleArmTrials, simulateTwoArmTrials } from "./simulation";
import { singleArmOperatingCharacteristics, twoArmOperatingCharacteristics } from "./operating-characteristics";
import { singleArmBoundaries } from "./boundaries";
import type { SingleArmDesign, TwoArmDesign } from "./types";
import { StatsDomainError } from "./validate";

const design: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 40,
  looks: { kind: "every", first: 10, every: 1 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.95 },
  safety: null,
};

function within4se(exact: number, sim: number, se: number, label: string): void {
  // A zero standard error (probability 0 or 1) must match exactly up to rounding.
  const tol = Math.max(4 * se, 1e-12);
  expect(Math.abs(exact - sim), `${label}: exact ${exact}, simulated ${sim}, 4 SE ${4 * se}`).toBeLessThanOrEqual(tol);
}

describe("Monte Carlo cross-check", () => {
  it("mulberry32 is reproducible from its seed and roughly uniform", () => {
    const a = mulberry32(2024);
    const b = mulberry32(2024);
    let sum = 0;
    let mismatches = 0;
    const n = 100_000;
    for (let i = 0; i < n; i++) {
      const u = a();
      if (u !== b()) mismatches++;
      sum += u;
    }
    expect(mismatches).toBe(0);
    // Mean of n uniforms: SD sqrt(1/12 / n).
    expect(Math.abs(sum / n - 0.5)).toBeLessThan(4 * Math.sqrt(1 / 12 / n));
  });

  for (const p of [0.2, 0.4])
    it(`single arm at p = ${p}: exact OC agree with 200,000 simulated trials within 4 standard errors`, () => {
      const exact = singleArmOperatingCharacteristics(design, p);
      const sim = simulateSingleArmTrials(design, p, { trials: 200_000, seed: 20240611 });
      expect(sim.seed).toBe(20240611);
      within4se(exact.pDeclareSuccess, sim.pDeclareSuccess, sim.standardErrors.pDeclareSuccess, "P(declare success)");
      within4se(exact.pEarlyTermination, sim.pEarlyTermination, sim.standardErrors.pEarlyTermination, "P(early termination)");
      within4se(exact.expectedSampleSize, sim.expectedSampleSize, sim.standardErrors.expectedSampleSize, "expected sample size");
    });

  it("the boundary-table simulator agrees with the decision-based one trial for trial (same seed)", () => {
    const b = singleArmBoundaries(design).response;
    const s1 = simulateBoundaryTable(b, 0.3, { trials: 20_000, seed: 7 });
    const s2 = simulateSingleArmTrials(design, 0.3, { trials: 20_000, seed: 7 });
    expect(s1.looks).toEqual(s2.looks);
  });

  it("two arms at (0.55, 0.3): exact OC agree with 20,000 simulated trials within 4 standard errors", () => {
    const two: TwoArmDesign = {
      arms: "two",
      priorT: { family: "uniform" },
      priorC: { family: "uniform" },
      controlRate: 0.3,
      experimentalRate: 0.55,
      delta: 0,
      nMaxPerArm: 30,
      looks: { kind: "every", first: 10, every: 5 },
      rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.98 },
      safety: null,
    };
    const exact = twoArmOperatingCharacteristics(two, 0.55, 0.3);
    const sim = simulateTwoArmTrials(two, 0.55, 0.3, { trials: 20_000, seed: 99 });
    within4se(exact.pDeclareSuccess, sim.pDeclareSuccess, sim.standardErrors.pDeclareSuccess, "P(declare success)");
    within4se(exact.pEarlyTermination, sim.pEarlyTermination, sim.standardErrors.pEarlyTermination, "P(early termination)");
    within4se(exact.expectedSampleSize, sim.expectedSampleSize, sim.standardErrors.expectedSampleSize, "expected sample size");
  });

  it("rejects: trials must be a positive integer", () => {
    expect(() => simulateSingleArmTrials(design, 0.3, { trials: 0, seed: 1 })).toThrow(StatsDomainError);
  });
  it("rejects: the seed must be an integer", () => {
    expect(() => mulberry32(0.5)).toThrow(StatsDomainError);
  });
});
