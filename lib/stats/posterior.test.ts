import { describe, expect, it } from "vitest";
import stdlibBetaCdf from "@stdlib/stats-base-dists-beta-cdf";
import stdlibBetaPdf from "@stdlib/stats-base-dists-beta-pdf";
import stdlibBetaQuantile from "@stdlib/stats-base-dists-beta-quantile";
import { cdfGrid, densityGrid, mixtureQuantile, posteriorSummary, probInInterval } from "./posterior";
import { mixtureCdf } from "./priors";
import { StatsDomainError } from "./validate";
import type { MixtureBeta } from "./types";

const uniform: MixtureBeta = [{ weight: 1, a: 1, b: 1 }];
const jeffreys: MixtureBeta = [{ weight: 1, a: 0.5, b: 0.5 }];

describe("facts of the trade (common practice, no source)", () => {
  it("uniform prior, 7 of 10 responders: P(0.6 < p <= 0.8) = 0.54258 to 5 decimals", () => {
    const post = posteriorSummary(uniform, 7, 10).components;
    expect(probInInterval(post, 0.6, 0.8).toFixed(5)).toBe("0.54258");
  });
  it("uniform prior, 2 of 100: 95% equal-tailed interval 0.0062 to 0.0697 to 4 decimals", () => {
    const s = posteriorSummary(uniform, 2, 100);
    expect(s.equalTailed.lower.toFixed(4)).toBe("0.0062");
    expect(s.equalTailed.upper.toFixed(4)).toBe("0.0697");
  });
});

describe("against @stdlib (npm) Beta functions", () => {
  const cases: Array<[MixtureBeta, number, number, number]> = [
    [uniform, 7, 10, 0.5],
    [jeffreys, 3, 25, 0.2],
    [[{ weight: 1, a: 2.4, b: 9.6 }], 11, 40, 0.3],
  ];
  for (const [prior, x, n, p0] of cases)
    it(`Beta(${prior[0].a},${prior[0].b}) prior, ${x} of ${n}: median, interval, P(p > p0)`, () => {
      const a = prior[0].a + x;
      const b = prior[0].b + n - x;
      const s = posteriorSummary(prior, x, n, { level: 0.9, p0 });
      expect(Math.abs(s.median - stdlibBetaQuantile(0.5, a, b))).toBeLessThan(1e-12);
      expect(Math.abs(s.equalTailed.lower - stdlibBetaQuantile(0.05, a, b))).toBeLessThan(1e-12);
      expect(Math.abs(s.equalTailed.upper - stdlibBetaQuantile(0.95, a, b))).toBeLessThan(1e-12);
      expect(Math.abs(s.probAboveP0! - (1 - stdlibBetaCdf(p0, a, b)))).toBeLessThan(1e-12);
      // Exact identities for a Beta(a, b): mean a/(a+b), variance ab/((a+b)^2 (a+b+1)), mode (a-1)/(a+b-2).
      expect(Math.abs(s.mean - a / (a + b))).toBeLessThan(1e-15);
      expect(Math.abs(s.sd - Math.sqrt((a * b) / ((a + b) ** 2 * (a + b + 1))))).toBeLessThan(1e-15);
      expect(Math.abs(s.mode! - (a - 1) / (a + b - 2))).toBeLessThan(1e-15);
    });
  it("densityGrid and cdfGrid match stdlib pdf and cdf", () => {
    const post: MixtureBeta = [{ weight: 1, a: 8, b: 4 }];
    const d = densityGrid(post, 11);
    const c = cdfGrid(post, 11);
    for (let i = 0; i < 11; i++) {
      expect(Math.abs(d.density[i] - stdlibBetaPdf(d.p[i], 8, 4))).toBeLessThan(1e-12);
      expect(Math.abs(c.cdf[i] - stdlibBetaCdf(c.p[i], 8, 4))).toBeLessThan(1e-14);
    }
  });
});

describe("mixtures and edge shapes", () => {
  const mix: MixtureBeta = [
    { weight: 0.3, a: 20, b: 60 },
    { weight: 0.7, a: 3, b: 4 },
  ];
  it("mixtureQuantile inverts the mixture CDF", () => {
    for (const q of [1e-6, 0.025, 0.3, 0.5, 0.975, 1 - 1e-7]) expect(Math.abs(mixtureCdf(mix, mixtureQuantile(mix, q)) - q)).toBeLessThan(1e-12);
  });
  it("a mixture's mean is the weighted mean of its components (exact identity)", () => {
    const s = posteriorSummary(mix, 0, 0);
    expect(Math.abs(s.mean - (0.3 * 20) / 80 - (0.7 * 3) / 7)).toBeLessThan(1e-15);
  });
  it("probInInterval is F(hi) - F(lo): adding adjacent intervals gives the union (exact identity)", () => {
    const whole = probInInterval(mix, 0.1, 0.7);
    expect(Math.abs(probInInterval(mix, 0.1, 0.35) + probInInterval(mix, 0.35, 0.7) - whole)).toBeLessThan(1e-14);
    expect(probInInterval(mix, 0.4, 0.4)).toBe(0);
  });
  it("U-shaped posterior: mode is null with a note, the HPD has two pieces", () => {
    const s = posteriorSummary(jeffreys, 0, 0);
    expect(s.mode).toBeNull();
    expect(s.modeNote).toMatch(/U-shaped/);
    expect(s.hpd.pieces.length).toBe(2);
  });
  it("flat posterior: mode is null with a note, HPD falls back to equal-tailed with a note", () => {
    const s = posteriorSummary(uniform, 0, 0);
    expect(s.mode).toBeNull();
    expect(s.hpd.note).toMatch(/flat/);
    expect(s.hpd.pieces[0].lower).toBeCloseTo(s.equalTailed.lower, 12);
  });
  it("0 of 12 under a uniform prior: J-shaped, mode 0, HPD starts at 0", () => {
    const s = posteriorSummary(uniform, 0, 12);
    expect(s.mode).toBe(0);
    expect(s.hpd.pieces[0].lower).toBe(0);
  });
  it("densityGrid clips an infinite density at 0 and says so", () => {
    const g = densityGrid([{ weight: 1, a: 0.5, b: 12.5 }], 101);
    expect(g.unboundedAt).toEqual([0]);
    expect(Number.isFinite(g.density[0])).toBe(true);
    expect(g.density[0]).toBeGreaterThan(g.density[1]);
  });
});

describe("invalid input (each rule)", () => {
  it("rule: counts must be non-negative (negative x or n)", () => {
    expect(() => posteriorSummary(uniform, -1, 10)).toThrow(StatsDomainError);
    expect(() => posteriorSummary(uniform, 0, -3)).toThrow(StatsDomainError);
  });
  it("rule: x must not exceed n", () => {
    expect(() => posteriorSummary(uniform, 11, 10)).toThrow(StatsDomainError);
  });
  it("rule: counts must be integers", () => {
    expect(() => posteriorSummary(uniform, 2.5, 10)).toThrow(StatsDomainError);
    expect(() => posteriorSummary(uniform, 2, 10.1)).toThrow(StatsDomainError);
  });
  it("rule: p0 must lie strictly between 0 and 1", () => {
    expect(() => posteriorSummary(uniform, 2, 10, { p0: 0 })).toThrow(StatsDomainError);
    expect(() => posteriorSummary(uniform, 2, 10, { p0: 1.2 })).toThrow(StatsDomainError);
  });
  it("rule: level must lie strictly between 0 and 1", () => {
    expect(() => posteriorSummary(uniform, 2, 10, { level: 1 })).toThrow(StatsDomainError);
    expect(() => posteriorSummary(uniform, 2, 10, { level: -0.1 })).toThrow(StatsDomainError);
  });
  it("rule: NaN is rejected everywhere", () => {
    expect(() => posteriorSummary(uniform, NaN, 10)).toThrow(StatsDomainError);
    expect(() => posteriorSummary(uniform, 2, 10, { p0: NaN })).toThrow(StatsDomainError);
    expect(() => posteriorSummary(uniform, 2, 10, { level: NaN })).toThrow(StatsDomainError);
    expect(() => probInInterval(uniform, NaN, 0.5)).toThrow(StatsDomainError);
    expect(() => mixtureQuantile(uniform, NaN)).toThrow(StatsDomainError);
  });
  it("rule: interval ends must lie in [0, 1] with lo <= hi", () => {
    expect(() => probInInterval(uniform, -0.1, 0.5)).toThrow(StatsDomainError);
    expect(() => probInInterval(uniform, 0.6, 0.5)).toThrow(StatsDomainError);
  });
  it("rule: grid points must be an integer from 2 to 100000", () => {
    expect(() => densityGrid(uniform, 1)).toThrow(StatsDomainError);
    expect(() => cdfGrid(uniform, 2.5)).toThrow(StatsDomainError);
  });
});
