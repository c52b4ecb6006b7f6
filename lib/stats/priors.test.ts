import { describe, expect, it } from "vitest";
import betaln from "@stdlib/math-base-special-betaln";
import { momentMatchedEffectiveSampleSize, resolvePrior, updateMixture } from "./priors";
import { StatsDomainError } from "./validate";
import type { MixtureBeta } from "./types";

/**
 * Marginal likelihood of x of n under Beta(a, b), by Simpson's rule on p^x (1-p)^(n-x) times the
 * Beta density (the density from @stdlib/math-base-special-betaln), independent of priors.ts.
 */
function marginalLikelihood(a: number, b: number, x: number, n: number): number {
  const m = 200_000;
  const h = 1 / m;
  let s = 0;
  for (let k = 0; k <= m; k++) {
    const p = k * h;
    const w = k === 0 || k === m ? 1 : k % 2 ? 4 : 2;
    s += (w * Math.pow(p, a + x - 1) * Math.pow(1 - p, b + n - x - 1)) / Math.exp(betaln(a, b));
  }
  return (s * h) / 3;
}

describe("resolvePrior", () => {
  it("uniform, Jeffreys, beta, informative, robust mixture", () => {
    expect(resolvePrior({ family: "uniform" })).toEqual([{ weight: 1, a: 1, b: 1 }]);
    expect(resolvePrior({ family: "jeffreys" })).toEqual([{ weight: 1, a: 0.5, b: 0.5 }]);
    expect(resolvePrior({ family: "beta", a: 2, b: 8 })).toEqual([{ weight: 1, a: 2, b: 8 }]);
    const inf = resolvePrior({ family: "informative", mean: 0.25, ess: 20 })[0];
    expect(inf.a).toBeCloseTo(5, 14);
    expect(inf.b).toBeCloseTo(15, 14);
    const rob = resolvePrior({ family: "robustMixture", mean: 0.25, ess: 20, weight: 0.8 });
    expect(rob).toHaveLength(2);
    expect(rob[0].weight + rob[1].weight).toBeCloseTo(1, 15);
    expect(rob[1]).toEqual({ weight: expect.closeTo(0.2, 15), a: 1, b: 1 });
  });
  it("rule: informative mean must lie strictly between 0 and 1; ess greater than 0", () => {
    expect(() => resolvePrior({ family: "informative", mean: 1, ess: 10 })).toThrow(StatsDomainError);
    expect(() => resolvePrior({ family: "informative", mean: 0.3, ess: 0 })).toThrow(StatsDomainError);
  });
});

describe("updateMixture", () => {
  it("posterior weights are prior weights times numerically integrated marginal likelihoods, renormalised", () => {
    // Components with shapes >= 1 so that the Simpson integrand is smooth at both ends.
    const prior: MixtureBeta = [
      { weight: 0.8, a: 6, b: 14 },
      { weight: 0.2, a: 1, b: 1 },
    ];
    for (const [x, n] of [
      [3, 20],
      [14, 20],
      [0, 8],
    ]) {
      const post = updateMixture(prior, x, n);
      const raw = prior.map((c) => c.weight * marginalLikelihood(c.a, c.b, x, n));
      const total = raw[0] + raw[1];
      expect(Math.abs(post[0].weight - raw[0] / total)).toBeLessThan(1e-9);
      expect(post[0]).toMatchObject({ a: 6 + x, b: 14 + n - x });
      expect(post[1]).toMatchObject({ a: 1 + x, b: 1 + n - x });
    }
  });
  it("rule: x must not exceed n", () => {
    expect(() => updateMixture([{ weight: 1, a: 1, b: 1 }], 5, 4)).toThrow(StatsDomainError);
  });
});

describe("momentMatchedEffectiveSampleSize (not the Morita definition; kept for comparison)", () => {
  it("one Beta(a, b): a + b", () => {
    expect(momentMatchedEffectiveSampleSize({ family: "beta", a: 3, b: 9 })).toBe(12);
    expect(momentMatchedEffectiveSampleSize({ family: "uniform" })).toBe(2);
    expect(momentMatchedEffectiveSampleSize({ family: "informative", mean: 0.3, ess: 40 })).toBeCloseTo(40, 12);
  });
  it("a mixture of identical components has the component's a + b (moment matching is exact then)", () => {
    expect(
      momentMatchedEffectiveSampleSize([
        { weight: 0.4, a: 5, b: 15 },
        { weight: 0.6, a: 5, b: 15 },
      ]),
    ).toBeCloseTo(20, 10);
  });
  it("a robust mixture is worth fewer patients than its informative part (moment-matched a + b = m(1-m)/v - 1)", () => {
    const ess = momentMatchedEffectiveSampleSize({ family: "robustMixture", mean: 0.3, ess: 40, weight: 0.8 });
    expect(ess).toBeLessThan(40);
    expect(ess).toBeGreaterThan(2);
    // Direct moment computation: mixture mean and second moment of 0.8 Beta(12, 28) + 0.2 Beta(1, 1).
    const m = 0.8 * 0.3 + 0.2 * 0.5;
    const e2 = (0.8 * 12 * 13) / (40 * 41) + (0.2 * 1 * 2) / (2 * 3);
    expect(Math.abs(ess - ((m * (1 - m)) / (e2 - m * m) - 1))).toBeLessThan(1e-10);
  });
});
