/**
 * The decision at a look. References outside the project: stdlib-js beta-cdf
 * (@stdlib/stats-base-dists-beta-cdf) for the posterior probabilities the decisions rest on, and the
 * exact series for P(X > Y) between Beta variables with integer shapes (two arms). The tie
 * convention (a probability equal to its threshold does not trigger) is pinned with thresholds set
 * to the very value the engine reports, one rounding step away (still a tie: lib/stats/compare.ts),
 * and just beyond the tie tolerance (which triggers).
 */
import { describe, expect, it } from "vitest";
import betaCdf from "@stdlib/stats-base-dists-beta-cdf";
import betaln from "@stdlib/math-base-special-betaln";
import { decideAtLook, formatAgainst } from "./decision";
import { TIE_TOLERANCE } from "./compare";
import type { SingleArmDesign, TwoArmDesign } from "./types";
import { StatsDomainError } from "./validate";

/** Smallest double above v (v > 0). */
function nextUp(v: number): number {
  const buf = new DataView(new ArrayBuffer(8));
  buf.setFloat64(0, v);
  buf.setBigUint64(0, buf.getBigUint64(0) + 1n);
  return buf.getFloat64(0);
}

const single: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 40,
  looks: { kind: "every", first: 10, every: 5 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: null,
};

describe("decideAtLook, single arm, predictive rule", () => {
  it("stops for futility when PP is below thetaL, in words a DMC member can read", () => {
    const r = decideAtLook(single, { n: 20, responders: 1 });
    expect(r.decision.action).toBe("stop");
    expect(r.decision).toMatchObject({ stop: "futility" });
    expect(r.predictiveProbability).not.toBeNull();
    expect(r.predictiveProbability!).toBeLessThan(0.05);
    expect(r.decision.reason).toMatch(/^Predictive probability of success 0\.\d{3} is below the futility threshold 0\.05: the data favour stopping for futility\.$/);
  });

  it("continues when PP is not below thetaL and efficacy stopping is off", () => {
    const r = decideAtLook(single, { n: 20, responders: 6 });
    expect(r.decision.action).toBe("continue");
    expect(r.decision.reason).toContain("efficacy stopping is off");
  });

  it("a tie does not trigger futility, nor does one rounding step above PP; a threshold beyond the tie tolerance does", () => {
    const pp = decideAtLook(single, { n: 20, responders: 4 }).predictiveProbability!;
    expect(pp).toBeGreaterThan(0);
    expect(pp).toBeLessThan(1);
    const tie = { ...single, rule: { ...single.rule, futilityThreshold: pp } };
    expect(decideAtLook(tie, { n: 20, responders: 4 }).decision.action).toBe("continue");
    const ulp = { ...single, rule: { ...single.rule, futilityThreshold: nextUp(pp) } };
    expect(decideAtLook(ulp, { n: 20, responders: 4 }).decision.action).toBe("continue");
    const above = { ...single, rule: { ...single.rule, futilityThreshold: pp + 2 * TIE_TOLERANCE } };
    expect(decideAtLook(above, { n: 20, responders: 4 }).decision).toMatchObject({ action: "stop", stop: "futility" });
  });

  it("a tie does not trigger efficacy, nor does one rounding step below PP; a threshold beyond the tie tolerance does", () => {
    const withEff = { ...single, rule: { ...single.rule, futilityThreshold: 0.01, efficacyStopping: true, efficacyThreshold: 0.99 } };
    const pp = decideAtLook(withEff, { n: 30, responders: 11 }).predictiveProbability!;
    expect(pp).toBeGreaterThan(0.01);
    expect(pp).toBeLessThan(1);
    const tie = { ...withEff, rule: { ...withEff.rule, efficacyThreshold: pp } };
    expect(decideAtLook(tie, { n: 30, responders: 11 }).decision.action).toBe("continue");
    const ulp = { ...withEff, rule: { ...withEff.rule, efficacyThreshold: pp - Number.EPSILON * pp } };
    expect(decideAtLook(ulp, { n: 30, responders: 11 }).decision.action).toBe("continue");
    const below = { ...withEff, rule: { ...withEff.rule, efficacyThreshold: pp - 2 * TIE_TOLERANCE } };
    expect(decideAtLook(below, { n: 30, responders: 11 }).decision).toMatchObject({ action: "stop", stop: "efficacy" });
  });

  it("PP equal to 1 does not exceed an efficacy threshold of 1 (the switch, not thetaU = 1, turns efficacy stopping off)", () => {
    const d = { ...single, rule: { ...single.rule, efficacyStopping: true, efficacyThreshold: 1 } };
    const r = decideAtLook(d, { n: 35, responders: 20 });
    expect(r.predictiveProbability).toBe(1);
    expect(r.decision.action).toBe("continue");
  });

  it("at nMax the final posterior rule applies, not PP, and agrees with stdlib beta-cdf", () => {
    for (let x = 8; x <= 14; x++) {
      const r = decideAtLook(single, { n: 40, responders: x });
      const want = 1 - betaCdf(0.2, 0.6 + x, 0.4 + 40 - x);
      expect(r.final).toBe(true);
      expect(r.predictiveProbability).toBeNull();
      expect(Math.abs(r.posteriorProbabilitySuccess - want)).toBeLessThan(1e-13);
      expect(r.decision).toMatchObject({ action: "final", success: want > 0.9 });
    }
  });

  it("a final posterior probability equal to thetaT is not success", () => {
    const p = decideAtLook(single, { n: 40, responders: 11 }).posteriorProbabilitySuccess;
    const tie = { ...single, rule: { ...single.rule, thetaT: p } };
    expect(decideAtLook(tie, { n: 40, responders: 11 }).decision).toMatchObject({ action: "final", success: false });
    const ulp = { ...single, rule: { ...single.rule, thetaT: p - Number.EPSILON * p } };
    expect(decideAtLook(ulp, { n: 40, responders: 11 }).decision).toMatchObject({ action: "final", success: false });
    const below = { ...single, rule: { ...single.rule, thetaT: p - 2 * TIE_TOLERANCE } };
    expect(decideAtLook(below, { n: 40, responders: 11 }).decision).toMatchObject({ action: "final", success: true });
  });
});

describe("decideAtLook, single arm, posterior rule", () => {
  const post: SingleArmDesign = {
    ...single,
    delta: 0.1,
    rule: { kind: "posterior", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.95 },
  };
  it("compares P(p > p0 + delta | data) (stdlib beta-cdf) with pL and pU", () => {
    for (const [x, n] of [
      [1, 15],
      [5, 15],
      [12, 15],
    ]) {
      const r = decideAtLook(post, { n, responders: x });
      const want = 1 - betaCdf(0.3, 0.6 + x, 0.4 + n - x);
      expect(Math.abs(r.posteriorProbabilityMonitoring! - want)).toBeLessThan(1e-13);
      const expected = want < 0.05 ? "futility" : want > 0.95 ? "efficacy" : null;
      if (expected) expect(r.decision).toMatchObject({ action: "stop", stop: expected });
      else expect(r.decision.action).toBe("continue");
    }
  });
});

describe("decideAtLook, safety rule", () => {
  const withSafety: SingleArmDesign = { ...single, safety: { qmax: 0.3, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.9 } };
  it("a safety signal outranks efficacy and futility, and P(q > qmax) agrees with stdlib beta-cdf", () => {
    const r = decideAtLook(withSafety, { n: 15, responders: 12, toxicities: 9 });
    const want = 1 - betaCdf(0.3, 0.6 + 9, 1.4 + 6);
    expect(Math.abs(r.safetyProbability! - want)).toBeLessThan(1e-13);
    expect(r.decision).toMatchObject({ action: "stop", stop: "safety" });
    expect(r.decision.reason).toContain("toxicity rate exceeds 30.0%");
  });
  it("a safety probability equal to thetaS does not trigger", () => {
    const s = decideAtLook(withSafety, { n: 15, responders: 6, toxicities: 8 }).safetyProbability!;
    const tie = { ...withSafety, safety: { ...withSafety.safety!, thetaS: s } };
    expect(decideAtLook(tie, { n: 15, responders: 6, toxicities: 8 }).decision.action).not.toBe("stop");
  });
  it("rejects: the toxicity count is required when the design has a safety rule", () => {
    expect(() => decideAtLook(withSafety, { n: 15, responders: 6 })).toThrow(StatsDomainError);
  });
  it("rejects: toxicities must not exceed n", () => {
    expect(() => decideAtLook(withSafety, { n: 15, responders: 6, toxicities: 16 })).toThrow(StatsDomainError);
  });
});

/** Exact P(X > Y), X ~ Beta(aT, bT) with integer aT, Y ~ Beta(aC, bC). */
function exactProbGreater(aT: number, bT: number, aC: number, bC: number): number {
  let s = 0;
  for (let i = 0; i < aT; i++) s += Math.exp(betaln(aC + i, bC + bT) - Math.log(bT + i) - betaln(1 + i, bT) - betaln(aC, bC));
  return s;
}

describe("decideAtLook, two arms", () => {
  const two: TwoArmDesign = {
    arms: "two",
    priorT: { family: "uniform" },
    priorC: { family: "uniform" },
    controlRate: 0.3,
    experimentalRate: 0.55,
    delta: 0,
    nMaxPerArm: 20,
    looks: { kind: "every", first: 5, every: 5 },
    rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: false, efficacyThreshold: null },
    safety: null,
  };
  it("final analysis: P(pT - pC > 0) matches the exact integer-shape series", () => {
    for (const [xT, xC] of [
      [12, 6],
      [9, 7],
      [5, 10],
    ]) {
      const r = decideAtLook(two, { nT: 20, respondersT: xT, nC: 20, respondersC: xC });
      const want = exactProbGreater(1 + xT, 21 - xT, 1 + xC, 21 - xC);
      expect(Math.abs(r.posteriorProbabilitySuccess - want)).toBeLessThan(1e-9);
      expect(r.decision).toMatchObject({ action: "final", success: want > 0.9 });
      expect(r.decision.reason).toContain("experimental minus control");
    }
  });
  it("interim: futility when PP is below thetaL, continue otherwise", () => {
    expect(decideAtLook(two, { nT: 10, respondersT: 1, nC: 10, respondersC: 7 }).decision).toMatchObject({ action: "stop", stop: "futility" });
    expect(decideAtLook(two, { nT: 10, respondersT: 6, nC: 10, respondersC: 3 }).decision.action).toBe("continue");
  });
  it("rejects: nC must not exceed nMaxPerArm", () => {
    expect(() => decideAtLook(two, { nT: 10, respondersT: 1, nC: 21, respondersC: 7 })).toThrow(StatsDomainError);
  });
});

describe("decideAtLook rejects invalid designs and data, rule by rule", () => {
  const cases: [string, SingleArmDesign, { n: number; responders: number }, string][] = [
    ["responders must not exceed n", single, { n: 10, responders: 11 }, "x"],
    ["n must not exceed nMax", single, { n: 41, responders: 1 }, "n"],
    ["rule.kind must be predictive or posterior", { ...single, rule: { ...single.rule, kind: "bayes" as never } }, { n: 10, responders: 1 }, "rule.kind"],
    ["rule.thetaT must lie in [0, 1]", { ...single, rule: { ...single.rule, thetaT: 1.5 } }, { n: 10, responders: 1 }, "rule.thetaT"],
    ["rule.futilityThreshold must lie in [0, 1]", { ...single, rule: { ...single.rule, futilityThreshold: -0.1 } }, { n: 10, responders: 1 }, "rule.futilityThreshold"],
    ["efficacyThreshold is required when efficacy stopping is on", { ...single, rule: { ...single.rule, efficacyStopping: true, efficacyThreshold: null } }, { n: 10, responders: 1 }, "rule.efficacyThreshold"],
    ["efficacyThreshold must exceed the futility threshold", { ...single, rule: { ...single.rule, efficacyStopping: true, efficacyThreshold: 0.05 } }, { n: 10, responders: 1 }, "rule.efficacyThreshold"],
    ["p0 must lie strictly between 0 and 1", { ...single, p0: 0 }, { n: 10, responders: 1 }, "p0"],
    ["p0 + delta must lie strictly between 0 and 1 for the posterior rule", { ...single, delta: 0.85, rule: { ...single.rule, kind: "posterior" } }, { n: 10, responders: 1 }, "p0 + delta"],
    ["safety.qmax must lie strictly between 0 and 1", { ...single, safety: { qmax: 1, prior: { family: "uniform" }, thetaS: 0.9 } }, { n: 10, responders: 1 }, "safety.qmax"],
    ["the arms must be single or two", { ...single, arms: "three" as never }, { n: 10, responders: 1 }, "design.arms"],
  ];
  for (const [title, design, data, argument] of cases)
    it(title, () => {
      let err: unknown;
      try {
        decideAtLook(design, data);
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(StatsDomainError);
      expect((err as StatsDomainError).argument).toBe(argument);
    });
});

describe("formatAgainst", () => {
  it("shows 3 decimals unless rounding would put the value on or across the threshold", () => {
    expect(formatAgainst(0.03123, 0.05)).toBe("0.031");
    expect(formatAgainst(0.04996, 0.05)).toBe("0.04996");
    expect(formatAgainst(0.05004, 0.05)).toBe("0.05004");
    expect(formatAgainst(0.05, 0.05)).toBe("0.050");
  });
});
