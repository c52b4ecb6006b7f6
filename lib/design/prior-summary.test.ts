import { describe, expect, it } from "vitest";
import { effectiveSampleSize, negLogDensityCurvature, summarisePrior } from "./prior-summary";
import { resolvePrior } from "@/lib/stats/priors";

describe("effectiveSampleSize (Morita, Thall & Mueller 2008)", () => {
  // The paper's beta example: ESS of Beta(a, b) is a + b.
  for (const [a, b] of [[1, 1], [0.5, 0.5], [0.6, 0.4], [3, 7], [12, 28], [50, 2]] as const)
    it(`Beta(${a}, ${b}) has ESS a + b = ${a + b}`, () => {
      expect(effectiveSampleSize([{ weight: 1, a, b }])).toBeCloseTo(a + b, 9);
    });

  it("an informative prior from mean and ESS gives that ESS back", () => {
    expect(effectiveSampleSize(resolvePrior({ family: "informative", mean: 0.3, ess: 20 }))).toBeCloseTo(20, 9);
  });

  it("a robust mixture lies between the vague component's ESS (2) and the informative one's", () => {
    const ess = effectiveSampleSize(resolvePrior({ family: "robustMixture", mean: 0.3, ess: 20, weight: 0.8 }));
    expect(ess).toBeGreaterThan(2);
    expect(ess).toBeLessThan(20);
    expect(effectiveSampleSize(resolvePrior({ family: "robustMixture", mean: 0.3, ess: 20, weight: 1 }))).toBeCloseTo(20, 9);
    expect(effectiveSampleSize(resolvePrior({ family: "robustMixture", mean: 0.3, ess: 20, weight: 0 }))).toBeCloseTo(2, 9);
  });

  it("the analytic curvature matches a central finite difference of log density", () => {
    const m = resolvePrior({ family: "robustMixture", mean: 0.25, ess: 30, weight: 0.6 });
    const logp = (t: number) => Math.log(m.reduce((s, c) => s + c.weight * Math.exp((c.a - 1) * Math.log(t) + (c.b - 1) * Math.log(1 - t) - lbeta(c.a, c.b)), 0));
    const h = 1e-4;
    const t = 0.31;
    const fd = -(logp(t + h) - 2 * logp(t) + logp(t - h)) / (h * h);
    expect(negLogDensityCurvature(m, t)).toBeCloseTo(fd, 3);
  });

  it("the density summary integrates to about 1 and its mean is the prior mean", () => {
    const s = summarisePrior({ family: "beta", a: 3, b: 7 }, 999);
    const area = s.density.y.reduce((acc, v) => acc + v, 0) / 1000;
    expect(area).toBeCloseTo(1, 3);
    expect(s.mean).toBeCloseTo(0.3, 12);
    expect(s.ess).toBeCloseTo(10, 9);
  });
});

// log B(a, b) by Stirling-free direct gamma (Lanczos) kept local so the check does not reuse lib/stats.
function lbeta(a: number, b: number): number {
  return lgamma(a) + lgamma(b) - lgamma(a + b);
}
function lgamma(x: number): number {
  const g = 7;
  const c = [0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - lgamma(1 - x);
  x -= 1;
  let s = c[0];
  for (let i = 1; i < g + 2; i++) s += c[i] / (x + i);
  const t = x + g + 0.5;
  return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(s);
}
