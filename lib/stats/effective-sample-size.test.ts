/**
 * Effective sample size of Morita, Thall & Mueller (2008, Biometrics 64:595-602).
 *
 * Checks outside the engine:
 * - the paper's result for conjugate beta priors: ESS of Beta(a, b) is a + b;
 * - a brute-force version of the paper's definition written here: the prior's curvature at its mean
 *   by a central finite difference of log density from @stdlib/stats-base-dists-beta-pdf (npm), the
 *   posterior curvature of an epsilon-information Beta(c mu, c (1 - mu)) prior (c = 1e-3) averaged
 *   over the prior predictive distribution of Y (a mixture of beta-binomials, pmf from
 *   @stdlib/math-base-special-betaln), and the integer m >= 0 minimising the difference by search.
 */
import { describe, expect, it } from "vitest";
import betaPdf from "@stdlib/stats-base-dists-beta-pdf";
import betaln from "@stdlib/math-base-special-betaln";
import { momentMatchedEffectiveSampleSize, moritaEffectiveSampleSize, priorEffectiveSampleSize, resolvePrior } from "./priors";
import type { MixtureBeta } from "./types";
import { StatsDomainError } from "./validate";

const logChoose = (n: number, k: number) => {
  let s = 0;
  for (let i = 1; i <= k; i++) s += Math.log(n - k + i) - Math.log(i);
  return s;
};

/** The paper's search: integer m in 0..mMax minimising |D_p(mu) - E_Y D_q(m, mu)|. */
function bruteForceMorita(prior: MixtureBeta, mMax = 200): { m: number; gaps: number[] } {
  const mu = prior.reduce((s, c) => s + (c.weight * c.a) / (c.a + c.b), 0);
  const logDensity = (t: number) => Math.log(prior.reduce((s, c) => s + c.weight * betaPdf(t, c.a, c.b), 0));
  const h = 1e-4;
  const dp = -(logDensity(mu + h) - 2 * logDensity(mu) + logDensity(mu - h)) / (h * h);
  const c = 1e-3;
  const dq = (m: number) => {
    let s = 0;
    for (let y = 0; y <= m; y++) {
      // Prior predictive P(Y = y): mixture of beta-binomial pmfs.
      const pmf = prior.reduce((acc, k) => acc + k.weight * Math.exp(logChoose(m, y) + betaln(k.a + y, k.b + m - y) - betaln(k.a, k.b)), 0);
      const a = c * mu + y;
      const b = c * (1 - mu) + m - y;
      // -d^2/dt^2 log Beta(t; a, b) = (a - 1)/t^2 + (b - 1)/(1 - t)^2 (exact identity).
      s += pmf * ((a - 1) / (mu * mu) + (b - 1) / ((1 - mu) * (1 - mu)));
    }
    return s;
  };
  const gaps = Array.from({ length: mMax + 1 }, (_, m) => Math.abs(dp - dq(m)));
  let best = 0;
  for (let m = 1; m <= mMax; m++) if (gaps[m] < gaps[best]) best = m;
  return { m: best, gaps };
}

describe("Morita, Thall & Mueller (2008) effective sample size", () => {
  // The paper's result for a conjugate beta prior: its ESS is a + b.
  for (const [a, b] of [
    [1, 1],
    [0.5, 0.5],
    [0.6, 0.4],
    [3, 7],
    [12, 28],
    [50, 2],
  ] as const)
    it(`Beta(${a}, ${b}) has ESS a + b = ${a + b} (the paper's beta result)`, () => {
      expect(moritaEffectiveSampleSize([{ weight: 1, a, b }])).toBe(a + b);
      // The general mixture formula gives the same for a split of one Beta into identical components.
      expect(moritaEffectiveSampleSize([{ weight: 0.3, a, b }, { weight: 0.7, a, b }])).toBeCloseTo(a + b, 8);
    });

  for (const [label, prior] of [
    ["robust mixture 0.8 Beta(mean 0.3, ESS 20) + 0.2 Beta(1, 1)", resolvePrior({ family: "robustMixture", mean: 0.3, ess: 20, weight: 0.8 })],
    ["robust mixture 0.6 Beta(mean 0.25, ESS 30) + 0.4 Beta(1, 1)", resolvePrior({ family: "robustMixture", mean: 0.25, ess: 30, weight: 0.6 })],
    ["robust mixture 0.9 Beta(mean 0.15, ESS 60) + 0.1 Beta(1, 1)", resolvePrior({ family: "robustMixture", mean: 0.15, ess: 60, weight: 0.9 })],
    ["two informative components 0.5 Beta(6, 14) + 0.5 Beta(9, 11)", [{ weight: 0.5, a: 6, b: 14 }, { weight: 0.5, a: 9, b: 11 }]],
  ] as [string, MixtureBeta][])
    it(`${label}: the continuous ESS rounds to the paper's integer search (brute force)`, () => {
      const ess = moritaEffectiveSampleSize(prior);
      const brute = bruteForceMorita(prior);
      expect(brute.m).toBeLessThan(200); // an interior minimum, not the end of the search
      expect(Math.abs(ess - brute.m)).toBeLessThanOrEqual(0.5 + 0.01);
      // Not the moment-matched size: for these mixtures the two definitions differ by at least a patient.
      if (prior.length > 1 && prior[0].a !== prior[1].a) expect(Math.abs(ess - momentMatchedEffectiveSampleSize(prior))).toBeGreaterThan(1);
    });

  it("a mixture whose log density is convex at its mean (two separated components) has ESS 0, the paper's minimiser over m >= 0", () => {
    const bimodal: MixtureBeta = [
      { weight: 0.5, a: 4, b: 36 },
      { weight: 0.5, a: 36, b: 4 },
    ];
    expect(moritaEffectiveSampleSize(bimodal)).toBe(0);
    expect(bruteForceMorita(bimodal, 50).m).toBe(0);
  });

  it("priorEffectiveSampleSize is the Morita ESS (what the design studio shows)", () => {
    const spec = { family: "robustMixture", mean: 0.3, ess: 20, weight: 0.8 } as const;
    expect(priorEffectiveSampleSize(spec)).toBe(moritaEffectiveSampleSize(spec));
    expect(priorEffectiveSampleSize({ family: "informative", mean: 0.3, ess: 40 })).toBeCloseTo(40, 12);
  });

  it("invalid prior: weights not summing to 1 or a shape <= 0 throw StatsDomainError", () => {
    expect(() => moritaEffectiveSampleSize([{ weight: 0.5, a: 2, b: 2 }])).toThrow(StatsDomainError);
    expect(() => moritaEffectiveSampleSize([{ weight: 1, a: 0, b: 2 }])).toThrow(StatsDomainError);
  });
});
