/**
 * Predictive probability of success. References outside the project:
 * - Lee & Liu (2008), Clinical Trials 5:93-106, worked interim example (value recalled from memory).
 * - stdlib-js (@stdlib/math-base-special-betaln, @stdlib/stats-base-dists-beta-cdf): an independent
 *   evaluation of the beta-binomial predictive sum and of the final posterior rule.
 * - probDifferenceExceeds is checked elsewhere; here the two-arm PP is checked against a brute-force
 *   sum over the joint future that calls it directly at every outcome, and the final table against
 *   the exact series for P(X > Y) with integer shapes (Beta(aT, bT) vs Beta(aC, bC), aT integer).
 */
import { describe, expect, it } from "vitest";
import betaln from "@stdlib/math-base-special-betaln";
import betaCdf from "@stdlib/stats-base-dists-beta-cdf";
import {
  monotoneThresholds,
  posteriorMixture,
  predictiveDistribution,
  predictiveProbabilitySingleArm,
  predictiveProbabilityTwoArm,
  singleArmFinalSuccess,
  singleArmPredictiveTable,
  twoArmFinalRule,
  twoArmPredictiveTableAtLook,
} from "./predictive";
import { probDifferenceExceeds } from "./difference";
import type { MixtureBeta } from "./types";
import { StatsDomainError } from "./validate";

/** Reference PP from stdlib: posterior weights, beta-binomial masses and the final rule, all in logs. */
function referencePP(prior: MixtureBeta, x: number, n: number, N: number, p0: number, thetaT: number): number {
  const post = (xx: number, nn: number) => {
    const lw = prior.map((c) => Math.log(c.weight) + betaln(c.a + xx, c.b + nn - xx) - betaln(c.a, c.b));
    const mx = Math.max(...lw);
    const w = lw.map((l) => Math.exp(l - mx));
    const t = w.reduce((s, v) => s + v, 0);
    return prior.map((c, i) => ({ w: w[i] / t, a: c.a + xx, b: c.b + nn - xx }));
  };
  const m = N - n;
  const now = post(x, n);
  let pp = 0;
  for (let y = 0; y <= m; y++) {
    const fin = post(x + y, N);
    const pSucc = fin.reduce((s, c) => s + c.w * (1 - betaCdf(p0, c.a, c.b)), 0);
    if (!(pSucc > thetaT)) continue;
    const logChoose = -Math.log(m + 1) - betaln(y + 1, m - y + 1);
    pp += now.reduce((s, c) => s + c.w * Math.exp(logChoose + betaln(c.a + y, c.b + m - y) - betaln(c.a, c.b)), 0);
  }
  return pp;
}

const LEE_LIU_PRIOR: MixtureBeta = [{ weight: 1, a: 0.6, b: 0.4 }];

describe("single-arm predictive probability", () => {
  it("Lee & Liu (2008) worked example: 16 responders of 23, Nmax 40, p0 0.6, Beta(0.6, 0.4), thetaT 0.9 gives PP 0.5656 (from memory)", () => {
    const pp = predictiveProbabilitySingleArm({ prior: LEE_LIU_PRIOR, x: 16, n: 23, nMax: 40, p0: 0.6, thetaT: 0.9 });
    expect(pp).toBeCloseTo(0.5656, 4);
  });

  it("agrees with an independent stdlib-js evaluation for single and mixture priors (abs. tol. 1e-12)", () => {
    const priors: MixtureBeta[] = [
      LEE_LIU_PRIOR,
      [{ weight: 1, a: 1, b: 1 }],
      [{ weight: 1, a: 0.5, b: 0.5 }],
      [
        { weight: 0.7, a: 6, b: 14 },
        { weight: 0.3, a: 1, b: 1 },
      ],
    ];
    const cases = [
      [3, 10, 40, 0.2, 0.9],
      [16, 23, 40, 0.6, 0.9],
      [7, 30, 60, 0.2, 0.95],
      [0, 5, 25, 0.1, 0.8],
      [40, 90, 100, 0.35, 0.975],
    ];
    for (const prior of priors)
      for (const [x, n, N, p0, thetaT] of cases) {
        const got = predictiveProbabilitySingleArm({ prior, x, n, nMax: N, p0, thetaT });
        const want = referencePP(prior, x, n, N, p0, thetaT);
        expect(Math.abs(got - want), `prior ${JSON.stringify(prior)} x=${x} n=${n} N=${N}: got ${got}, want ${want}`).toBeLessThan(1e-12);
      }
  });

  it("the predictive distribution sums to one and matches the stdlib beta-binomial masses", () => {
    const pmf = predictiveDistribution(LEE_LIU_PRIOR, 16, 23, 40);
    expect(pmf.length).toBe(18);
    expect(pmf.reduce((s, v) => s + v, 0)).toBeCloseTo(1, 14);
    const a = 16.6;
    const b = 7.4;
    for (let y = 0; y <= 17; y++) {
      const want = Math.exp(-Math.log(18) - betaln(y + 1, 18 - y) + betaln(a + y, b + 17 - y) - betaln(a, b));
      expect(Math.abs(pmf[y] - want)).toBeLessThan(1e-14);
    }
  });

  it("final success indicators match the posterior rule evaluated with stdlib beta-cdf (strict >)", () => {
    const s = singleArmFinalSuccess(LEE_LIU_PRIOR, 40, 0.2, 0.9);
    for (let x = 0; x <= 40; x++) expect(s[x], `x=${x}`).toBe(1 - betaCdf(0.2, 0.6 + x, 40.4 - x) > 0.9 ? 1 : 0);
  });

  it("identity: PP at the final analysis is exactly 1 or 0, by the final rule", () => {
    const s = singleArmFinalSuccess(LEE_LIU_PRIOR, 40, 0.2, 0.9);
    for (let x = 0; x <= 40; x++) {
      const pp = predictiveProbabilitySingleArm({ prior: LEE_LIU_PRIOR, x, n: 40, nMax: 40, p0: 0.2, thetaT: 0.9 });
      expect(pp).toBe(s[x] === 1 ? 1 : 0);
    }
  });

  it("PP is exactly 1 when every future outcome succeeds and exactly 0 when none can", () => {
    const min = singleArmFinalSuccess(LEE_LIU_PRIOR, 40, 0.2, 0.9).indexOf(1);
    // Already at the success count with patients to go: even zero further responders succeed.
    expect(predictiveProbabilitySingleArm({ prior: LEE_LIU_PRIOR, x: min, n: 30, nMax: 40, p0: 0.2, thetaT: 0.9 })).toBe(1);
    // Too few responders for even an all-responder future to reach the success count.
    expect(predictiveProbabilitySingleArm({ prior: LEE_LIU_PRIOR, x: min - 11, n: 30, nMax: 40, p0: 0.2, thetaT: 0.9 })).toBe(0);
    // thetaT = 1 can never be exceeded; thetaT = 0 is exceeded by any Beta posterior.
    expect(predictiveProbabilitySingleArm({ prior: LEE_LIU_PRIOR, x: 20, n: 25, nMax: 40, p0: 0.2, thetaT: 1 })).toBe(0);
    expect(predictiveProbabilitySingleArm({ prior: LEE_LIU_PRIOR, x: 0, n: 25, nMax: 40, p0: 0.2, thetaT: 0 })).toBe(1);
  });

  it("the look table gives the same values as one PP at a time (bit for bit)", () => {
    const s = singleArmFinalSuccess(LEE_LIU_PRIOR, 40, 0.2, 0.9);
    const table = singleArmPredictiveTable(LEE_LIU_PRIOR, [10, 23, 39], 40, s);
    [10, 23, 39].forEach((n, k) => {
      for (let x = 0; x <= n; x++)
        expect(table[k][x]).toBe(predictiveProbabilitySingleArm({ prior: LEE_LIU_PRIOR, x, n, nMax: 40, p0: 0.2, thetaT: 0.9 }));
    });
  });

  const args = { prior: LEE_LIU_PRIOR, x: 3, n: 10, nMax: 40, p0: 0.2, thetaT: 0.9 };
  const bad: [string, Partial<typeof args>, string][] = [
    ["x must not exceed n", { x: 11 }, "x"],
    ["n must not exceed nMax", { n: 41, x: 3 }, "n"],
    ["x must be a non-negative integer", { x: 1.5 }, "x"],
    ["p0 must lie strictly between 0 and 1", { p0: 1 }, "p0"],
    ["thetaT must lie in [0, 1]", { thetaT: 1.2 }, "thetaT"],
    ["prior weights must sum to 1", { prior: [{ weight: 0.5, a: 1, b: 1 }] }, "prior weights"],
    ["prior shapes must be positive", { prior: [{ weight: 1, a: 0, b: 1 }] }, "prior[0].a"],
  ];
  for (const [title, patch, argument] of bad)
    it(`rejects: ${title}`, () => {
      let err: unknown;
      try {
        predictiveProbabilitySingleArm({ ...args, ...patch });
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(StatsDomainError);
      expect((err as StatsDomainError).argument).toBe(argument);
    });
});

/** Exact P(X > Y), X ~ Beta(aT, bT) with integer aT, Y ~ Beta(aC, bC): sum over i < aT of B(aC + i, bC + bT) / ((bT + i) B(1 + i, bT) B(aC, bC)). */
function exactProbGreater(aT: number, bT: number, aC: number, bC: number): number {
  let s = 0;
  for (let i = 0; i < aT; i++) s += Math.exp(betaln(aC + i, bC + bT) - Math.log(bT + i) - betaln(1 + i, bT) - betaln(aC, bC));
  return s;
}

describe("two-arm predictive probability", () => {
  const uniform: MixtureBeta = [{ weight: 1, a: 1, b: 1 }];
  const N = 12;

  it("the final table matches the exact series for P(pT > pC) with uniform priors (delta 0)", () => {
    const rule = twoArmFinalRule(uniform, uniform, N, 0, 0.9);
    for (let xC = 0; xC <= N; xC++) {
      let want = N + 1;
      for (let xT = N; xT >= 0; xT--) if (exactProbGreater(1 + xT, 1 + N - xT, 1 + xC, 1 + N - xC) > 0.9) want = xT;
      expect(rule.minSuccessT[xC], `xC=${xC}`).toBe(want);
    }
  });

  it("the boundary walk equals an exhaustive scan of the predicate", () => {
    const prob = (xT: number, xC: number) =>
      probDifferenceExceeds(posteriorMixture(uniform, xT, N), posteriorMixture(uniform, xC, N), -0.1);
    const walked = monotoneThresholds(N, N, (xT, xC) => prob(xT, xC) > 0.8);
    for (let xC = 0; xC <= N; xC++) {
      let want = N + 1;
      for (let xT = N; xT >= 0; xT--) if (prob(xT, xC) > 0.8) want = xT;
      expect(walked[xC]).toBe(want);
    }
  });

  it("agrees with a brute-force sum over the joint future (abs. tol. 1e-12), unequal arms included", () => {
    const priorT: MixtureBeta = [
      { weight: 0.6, a: 3, b: 7 },
      { weight: 0.4, a: 1, b: 1 },
    ];
    const priorC: MixtureBeta = [{ weight: 1, a: 0.5, b: 0.5 }];
    const delta = 0.05;
    const thetaT = 0.85;
    const rule = twoArmFinalRule(priorT, priorC, N, delta, thetaT);
    for (const [xT, nT, xC, nC] of [
      [3, 6, 1, 6],
      [5, 8, 4, 7],
      [0, 4, 2, 4],
      [6, 9, 6, 9],
    ]) {
      const pmfT = predictiveDistribution(priorT, xT, nT, N);
      const pmfC = predictiveDistribution(priorC, xC, nC, N);
      let want = 0;
      for (let yT = 0; yT < pmfT.length; yT++)
        for (let yC = 0; yC < pmfC.length; yC++) {
          const p = probDifferenceExceeds(posteriorMixture(priorT, xT + yT, N), posteriorMixture(priorC, xC + yC, N), delta);
          if (p > thetaT) want += pmfT[yT] * pmfC[yC];
        }
      const got = predictiveProbabilityTwoArm({ priorT, priorC, xT, nT, xC, nC, finalRule: rule });
      expect(Math.abs(got - want), `(${xT}/${nT}, ${xC}/${nC})`).toBeLessThan(1e-12);
    }
  });

  it("identity: two-arm PP at the final analysis is exactly 1 or 0; exactly 1 or 0 when the future cannot change the outcome", () => {
    const rule = twoArmFinalRule(uniform, uniform, N, 0, 0.9);
    for (const [xT, xC] of [
      [10, 2],
      [6, 6],
      [12, 0],
    ]) {
      const pp = predictiveProbabilityTwoArm({ priorT: uniform, priorC: uniform, xT, nT: N, xC, nC: N, finalRule: rule });
      expect(pp).toBe(xT >= rule.minSuccessT[xC] ? 1 : 0);
    }
    // 11 of 11 against 0 of 11 with one patient per arm to go: succeeds whatever happens.
    expect(predictiveProbabilityTwoArm({ priorT: uniform, priorC: uniform, xT: 11, nT: 11, xC: 0, nC: 11, finalRule: rule })).toBe(1);
    expect(predictiveProbabilityTwoArm({ priorT: uniform, priorC: uniform, xT: 0, nT: 11, xC: 11, nC: 11, finalRule: rule })).toBe(0);
  });

  // The table comes from the backward recursion, one state from the sum over the joint future:
  // equal in exact arithmetic, so they agree to rounding (far inside the 1e-9 tie tolerance), and
  // exactly where PP is exactly 0 or 1.
  it("the look table equals PP computed one state at a time (to 1e-14)", () => {
    const rule = twoArmFinalRule(uniform, uniform, N, 0, 0.9);
    const table = twoArmPredictiveTableAtLook(uniform, uniform, 6, rule);
    for (let xC = 0; xC <= 6; xC++)
      for (let xT = 0; xT <= 6; xT++) {
        const one = predictiveProbabilityTwoArm({ priorT: uniform, priorC: uniform, xT, nT: 6, xC, nC: 6, finalRule: rule });
        expect(Math.abs(table[xC][xT] - one)).toBeLessThan(1e-14);
        if (one === 0 || one === 1) expect(table[xC][xT]).toBe(one);
      }
  });

  it("rejects: delta must lie strictly between -1 and 1", () => {
    expect(() => twoArmFinalRule(uniform, uniform, N, 1, 0.9)).toThrow(StatsDomainError);
  });
  it("rejects: nT must not exceed nMaxPerArm", () => {
    const rule = twoArmFinalRule(uniform, uniform, N, 0, 0.9);
    expect(() => predictiveProbabilityTwoArm({ priorT: uniform, priorC: uniform, xT: 1, nT: 13, xC: 0, nC: 3, finalRule: rule })).toThrow(
      StatsDomainError,
    );
  });
});
