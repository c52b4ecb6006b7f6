/**
 * distributions.ts against fixtures from stdlib-js (library, version and seed recorded in each file;
 * regenerate with `npx tsx lib/stats/__fixtures__/generate.ts`). Tolerances are relative,
 * k * EPS * |expected|, with k stated per function and shape range; shapes in "large" (50 to 5000)
 * lose digits in the incomplete-beta prefactor exp(a ln p + b ln(1 - p) - ln B(a, b)).
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import jstat from "jstat";
import {
  betaBinomialPmfs,
  betaCdf,
  betaPdf,
  betaQuantile,
  betaSurvival,
  binomialPmfs,
  logBeta,
  logBetaBinomialPmf,
  logChoose,
} from "./distributions";
import { StatsDomainError } from "./validate";

const EPS = 2.220446049250313e-16;
type Fixture = { library: string; version: string; seed: number; rows: Array<Record<string, number | string>> };
const load = (name: string): Fixture =>
  JSON.parse(readFileSync(path.join(__dirname, "__fixtures__", name), "utf8")) as Fixture;

/** Checks every row; a failure lists inputs, expected, actual, difference and tolerance. */
function compare(
  fixture: Fixture,
  actualOf: (row: Record<string, number | string>) => number,
  k: (row: Record<string, number | string>) => number,
  scale: (expected: number) => number = (e) => Math.abs(e),
) {
  const failures: string[] = [];
  for (const row of fixture.rows) {
    const expected = row.expected as number;
    const actual = actualOf(row);
    const diff = Math.abs(actual - expected);
    const tol = k(row) * EPS * scale(expected);
    if (!(diff <= tol)) {
      const { expected: _e, ...inputs } = row;
      failures.push(`inputs ${JSON.stringify(inputs)} expected ${expected} actual ${actual} difference ${diff} tolerance ${tol}`);
    }
  }
  expect(failures, `${fixture.library}@${fixture.version} seed ${fixture.seed}\n${failures.join("\n")}`).toEqual([]);
}

const byRange = (table: Record<string, number>) => (row: Record<string, number | string>) => table[row.range as string];

describe("against stdlib-js fixtures", () => {
  it("betaCdf: relative 5000 EPS (large shapes 1e6 EPS)", () => {
    compare(load("beta-cdf.json"), (r) => betaCdf(r.p as number, r.a as number, r.b as number), byRange({ moderate: 5000, small: 5000, skewed: 5000, large: 1e6 }));
  });
  it("betaPdf: relative 500 EPS", () => {
    compare(load("beta-pdf.json"), (r) => betaPdf(r.p as number, r.a as number, r.b as number), () => 500);
  });
  it("betaQuantile: relative 5000 EPS", () => {
    compare(load("beta-quantile.json"), (r) => betaQuantile(r.q as number, r.a as number, r.b as number), () => 5000);
  });
  it("logBeta: 200 EPS relative to max(1, |expected|)", () => {
    compare(load("betaln.json"), (r) => logBeta(r.a as number, r.b as number), () => 200, (e) => Math.max(1, Math.abs(e)));
  });
  it("logBetaBinomialPmf: 200 EPS relative to max(1, |expected|)", () => {
    compare(
      load("beta-binomial-logpmf.json"),
      (r) => logBetaBinomialPmf(r.k as number, r.m as number, r.a as number, r.b as number),
      () => 200,
      (e) => Math.max(1, Math.abs(e)),
    );
  });
  it("binomialPmfs: relative 5000 EPS", () => {
    compare(load("binomial-pmf.json"), (r) => binomialPmfs(r.m as number, r.p as number)[r.k as number], () => 5000);
  });
});

describe("cross-library check against jstat 1.9.6", () => {
  // jstat's incomplete beta stops its continued fraction at a relative change of 3e-7 or after 100
  // terms, so agreement is asked only to 1e-6 (absolute), and only for shapes up to 300, where 100
  // terms suffice. A wrong branch, tail or prefactor in betaCdf would show far above that.
  const { jStat } = jstat;
  const shape = fc.oneof(fc.double({ min: 0.2, max: 5, noNaN: true }), fc.double({ min: 5, max: 300, noNaN: true }));
  it("betaCdf agrees with jStat.ibeta to 1e-6 over seeded random shapes and points", () => {
    fc.assert(
      fc.property(shape, shape, fc.double({ min: 1e-6, max: 1 - 1e-6, noNaN: true }), (a, b, p) => {
        const ours = betaCdf(p, a, b);
        const theirs = jStat.ibeta(p, a, b) as number;
        return Math.abs(ours - theirs) <= 1e-6;
      }),
      { seed: 196, numRuns: 2000 },
    );
  });
  it("betaQuantile agrees with jStat.ibetainv (its starting point) to 1e-6", () => {
    for (const [a, b, q] of [
      [7.6, 23.4, 0.025],
      [7.6, 23.4, 0.975],
      [2.6, 38.4, 0.5],
      [30.6, 30.4, 0.9],
    ])
      expect(Math.abs(betaQuantile(q, a, b) - (jStat.ibetainv(q, a, b) as number))).toBeLessThanOrEqual(1e-6);
  });
});

describe("exact identities", () => {
  it("Beta(1, 1) is uniform: F(p) = p", () => {
    for (const p of [1e-9, 0.1, 0.5, 0.77]) expect(Math.abs(betaCdf(p, 1, 1) - p)).toBeLessThan(1e-15);
  });
  it("Beta(a, 1): F(p) = p^a; Beta(1, b): S(p) = (1 - p)^b", () => {
    expect(Math.abs(betaCdf(0.3, 0.05, 1) - 0.3 ** 0.05)).toBeLessThan(1e-15);
    expect(Math.abs(betaSurvival(0.02, 1, 2000) / (0.98 ** 2000) - 1)).toBeLessThan(1e-12);
  });
  it("cdf + survival = 1 and the quantile inverts the cdf", () => {
    for (const [a, b, p] of [
      [3, 4, 0.2],
      [0.5, 20.5, 0.01],
      [300, 700, 0.31],
    ])
      expect(Math.abs(betaCdf(p, a, b) + betaSurvival(p, a, b) - 1)).toBeLessThan(1e-14);
    for (const [a, b, q] of [
      [3, 4, 0.2],
      [0.05, 2000, 0.9],
      [1200, 40, 1e-6],
    ])
      expect(Math.abs(betaCdf(betaQuantile(q, a, b), a, b) / q - 1)).toBeLessThan(1e-11);
  });
  it("logChoose(n, k) = ln of the exact integer C(n, k)", () => {
    expect(Math.abs(logChoose(10, 3) - Math.log(120))).toBeLessThan(1e-14);
    expect(Math.abs(logChoose(52, 5) - Math.log(2598960))).toBeLessThan(1e-13);
  });
  it("betaBinomialPmfs sums to 1 and matches the term-by-term log form", () => {
    const pmf = betaBinomialPmfs(30, 2.5, 7.5);
    expect(Math.abs(pmf.reduce((s, v) => s + v, 0) - 1)).toBeLessThan(1e-14);
    for (const k of [0, 7, 30]) expect(Math.abs(pmf[k] / Math.exp(logBetaBinomialPmf(k, 30, 2.5, 7.5)) - 1)).toBeLessThan(1e-12);
  });
});

describe("invalid input", () => {
  it("rule: shape parameters must be greater than 0", () => {
    expect(() => betaCdf(0.5, 0, 1)).toThrow(StatsDomainError);
    expect(() => betaPdf(0.5, 1, -1)).toThrow(StatsDomainError);
  });
  it("rule: arguments must be finite numbers (NaN)", () => {
    expect(() => betaCdf(NaN, 1, 1)).toThrow(StatsDomainError);
    expect(() => betaQuantile(0.5, NaN, 1)).toThrow(StatsDomainError);
  });
  it("rule: quantile probability must lie in [0, 1]", () => {
    expect(() => betaQuantile(1.1, 1, 1)).toThrow(StatsDomainError);
  });
  it("rule: counts must be non-negative integers and k must not exceed n", () => {
    expect(() => logChoose(5, 6)).toThrow(StatsDomainError);
    expect(() => logChoose(5.5, 2)).toThrow(StatsDomainError);
    expect(() => betaBinomialPmfs(-1, 1, 1)).toThrow(StatsDomainError);
  });
});
