import { describe, expect, it } from "vitest";
import binomialPmf from "@stdlib/stats-base-dists-binomial-pmf";
import jstat from "jstat";
import { clopperPearsonInterval, normalQuantile, wilsonInterval } from "./frequentist";
import { StatsDomainError } from "./validate";

const { jStat } = jstat;

/** P(X <= x) and P(X >= x) for X ~ Binomial(n, p), summed from @stdlib/stats-base-dists-binomial-pmf (npm). */
const binomCdf = (x: number, n: number, p: number) => {
  let s = 0;
  for (let k = 0; k <= x; k++) s += binomialPmf(k, n, p);
  return s;
};
const binomUpper = (x: number, n: number, p: number) => {
  let s = 0;
  for (let k = x; k <= n; k++) s += binomialPmf(k, n, p);
  return s;
};

describe("Clopper–Pearson (1934)", () => {
  it("defining property: P(X >= x | lower) = alpha/2 and P(X <= x | upper) = alpha/2, checked with stdlib binomial pmf", () => {
    for (const [x, n, level] of [
      [7, 10, 0.95],
      [2, 100, 0.95],
      [13, 40, 0.9],
      [1, 5, 0.99],
    ]) {
      const { lower, upper } = clopperPearsonInterval(x, n, level);
      const half = (1 - level) / 2;
      expect(Math.abs(binomUpper(x, n, lower) - half)).toBeLessThan(1e-12);
      expect(Math.abs(binomCdf(x, n, upper) - half)).toBeLessThan(1e-12);
    }
  });
  it("x = 0: lower is 0 and upper is 1 - (alpha/2)^(1/n); x = n mirrors it (exact identities)", () => {
    const a = clopperPearsonInterval(0, 10, 0.95);
    expect(a.lower).toBe(0);
    expect(Math.abs(a.upper - (1 - 0.025 ** (1 / 10)))).toBeLessThan(1e-14);
    const b = clopperPearsonInterval(10, 10, 0.95);
    expect(b.upper).toBe(1);
    expect(Math.abs(b.lower - 0.025 ** (1 / 10))).toBeLessThan(1e-14);
  });
  it("7 of 10 at 95%: 0.3475 to 0.9333 (value recalled from memory of standard exact-interval tables)", () => {
    const { lower, upper } = clopperPearsonInterval(7, 10, 0.95);
    expect(lower.toFixed(4)).toBe("0.3475");
    expect(upper.toFixed(4)).toBe("0.9333");
  });
});

describe("Wilson score interval (as defined in Brown, Cai & DasGupta 2001)", () => {
  it("defining property: the score statistic |x - n p| / sqrt(n p (1 - p)) equals z at both ends", () => {
    const z = normalQuantile(0.975);
    for (const [x, n] of [
      [7, 10],
      [2, 100],
      [25, 30],
    ]) {
      const { lower, upper } = wilsonInterval(x, n, 0.95);
      for (const p of [lower, upper]) expect(Math.abs(Math.abs(x - n * p) / Math.sqrt(n * p * (1 - p)) - z)).toBeLessThan(1e-9);
    }
  });
  it("7 of 10 at 95%: 0.3968 to 0.8922 (value recalled from memory)", () => {
    const { lower, upper } = wilsonInterval(7, 10, 0.95);
    expect(lower.toFixed(4)).toBe("0.3968");
    expect(upper.toFixed(4)).toBe("0.8922");
  });
  it("x = 0 starts at 0 and x = n ends at 1", () => {
    expect(wilsonInterval(0, 12, 0.95).lower).toBe(0);
    expect(wilsonInterval(12, 12, 0.95).upper).toBe(1);
  });
  it("normal quantile: z(0.975) = 1.959963984540054 (common practice, no source; recalled from memory) and symmetry z(q) = -z(1 - q)", () => {
    expect(Math.abs(normalQuantile(0.975) - 1.959963984540054)).toBeLessThan(1e-14);
    expect(Math.abs(normalQuantile(0.995) - 2.5758293035489)).toBeLessThan(1e-12);
    // q where 1 - q is exact in binary floating point, so the identity is not blurred by rounding the input.
    for (const q of [0.0078125, 0.125, 0.25, 0.375]) expect(Math.abs(normalQuantile(q) + normalQuantile(1 - q))).toBeLessThan(1e-13);
  });
});

describe("invalid input (each rule)", () => {
  it("rule: n must be at least 1", () => {
    expect(() => clopperPearsonInterval(0, 0, 0.95)).toThrow(StatsDomainError);
    expect(() => wilsonInterval(0, 0, 0.95)).toThrow(StatsDomainError);
  });
  it("rule: x must not exceed n; counts non-negative integers", () => {
    expect(() => clopperPearsonInterval(11, 10, 0.95)).toThrow(StatsDomainError);
    expect(() => clopperPearsonInterval(-1, 10, 0.95)).toThrow(StatsDomainError);
    expect(() => wilsonInterval(2.5, 10, 0.95)).toThrow(StatsDomainError);
  });
  it("rule: level must lie strictly between 0 and 1 (and not NaN)", () => {
    expect(() => clopperPearsonInterval(3, 10, 1)).toThrow(StatsDomainError);
    expect(() => wilsonInterval(3, 10, 0)).toThrow(StatsDomainError);
    expect(() => wilsonInterval(3, 10, NaN)).toThrow(StatsDomainError);
  });
});

describe("Wilson score interval against Newcombe (1998) and jstat", () => {
  // Newcombe RG. Two-sided confidence intervals for the single proportion: comparison of seven
  // methods. Statistics in Medicine 1998;17:857-872, worked examples (method 3, score interval
  // without continuity correction), 95%. Values recalled from memory of the paper's table.
  for (const [x, n, lower, upper] of [
    [81, 263, "0.2553", "0.3662"],
    [15, 148, "0.0624", "0.1605"],
    [0, 20, "0.0000", "0.1611"],
    [1, 29, "0.0061", "0.1718"],
  ] as const)
    it(`${x} of ${n}: ${lower} to ${upper} (Newcombe 1998, from memory)`, () => {
      const w = wilsonInterval(x, n, 0.95);
      expect(w.lower.toFixed(4)).toBe(lower);
      expect(w.upper.toFixed(4)).toBe(upper);
    });
  it("matches the score equation solved by bisection with jstat 1.9.6's normal quantile (second library), to 1e-12", () => {
    for (const [x, n, level] of [
      [81, 263, 0.95],
      [3, 17, 0.9],
      [40, 41, 0.99],
    ]) {
      const z = jStat.normal.inv(1 - (1 - level) / 2, 0, 1);
      const score = (p: number) => (x - n * p) / Math.sqrt(n * p * (1 - p));
      // score is decreasing in p: the lower end solves score = z, the upper end score = -z.
      const solve = (target: number, lo: number, hi: number) => {
        for (let i = 0; i < 200; i++) {
          const mid = (lo + hi) / 2;
          if (score(mid) > target) lo = mid;
          else hi = mid;
        }
        return (lo + hi) / 2;
      };
      const w = wilsonInterval(x, n, level);
      expect(Math.abs(w.lower - solve(z, 1e-15, x / n))).toBeLessThan(1e-12);
      expect(Math.abs(w.upper - solve(-z, x / n, 1 - 1e-15))).toBeLessThan(1e-12);
    }
  });
});
