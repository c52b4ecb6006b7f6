import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { hpdRegion, hpdRegionByLevelSet, singleBetaHpd } from "./hpd";
import { betaPdf, betaQuantile, logBeta } from "./distributions";
import { mixtureCdf } from "./priors";
import { StatsDomainError } from "./validate";
import type { MixtureBeta } from "./types";

const mixtureDensity = (m: MixtureBeta, p: number) => m.reduce((s, c) => s + c.weight * betaPdf(p, c.a, c.b), 0);
const regionMass = (m: MixtureBeta, pieces: Array<{ lower: number; upper: number }>) =>
  pieces.reduce((s, p) => s + mixtureCdf(m, p.upper) - mixtureCdf(m, p.lower), 0);
const length = (pieces: Array<{ lower: number; upper: number }>) => pieces.reduce((s, p) => s + p.upper - p.lower, 0);
const equalTailedLength = (a: number, b: number, level: number) => betaQuantile((1 + level) / 2, a, b) - betaQuantile((1 - level) / 2, a, b);

describe("HPD properties over random single Betas (seeded)", () => {
  const shape = fc.oneof(fc.double({ min: 0.1, max: 3, noNaN: true }), fc.double({ min: 1, max: 400, noNaN: true }));
  const level = fc.double({ min: 0.5, max: 0.99, noNaN: true });
  it("holds the stated mass to 1e-8, is never longer than the equal-tailed interval, and has equal density at interior ends", () => {
    fc.assert(
      fc.property(shape, shape, level, (a, b, lv) => {
        if (a === 1 && b === 1) return true;
        const m: MixtureBeta = [{ weight: 1, a, b }];
        const r = hpdRegion(m, lv);
        if (Math.abs(regionMass(m, r.pieces) - lv) > 1e-8) return false;
        if (length(r.pieces) > equalTailedLength(a, b, lv) + 1e-9) return false;
        const interior = r.pieces.flatMap((p) => [p.lower, p.upper]).filter((e) => e > 1e-300 && e < 1); // an end below 1e-300 is 0 in all but name
        if (interior.length === 2) {
          const [f1, f2] = interior.map((e) => betaPdf(e, a, b));
          if (Math.abs(f1 - f2) > 1e-6 * Math.max(f1, f2)) return false;
        }
        return true;
      }),
      { seed: 8675309, numRuns: 300 },
    );
  });
});

describe("single-Beta HPD solver against the general level-set search (seeded)", () => {
  // Two independent methods for the same region: Newton on the lower end versus bisection on the
  // density level over a grid. They must agree in every end and in the mass.
  const above1 = fc.double({ min: 1.001, max: 500, noNaN: true });
  const below1 = fc.double({ min: 0.05, max: 0.999, noNaN: true });
  const shapes = fc.oneof(fc.tuple(above1, above1), fc.tuple(below1, below1));
  const level = fc.double({ min: 0.5, max: 0.995, noNaN: true });
  it("converges, and its ends and mass match the level-set search", () => {
    fc.assert(
      fc.property(shapes, level, ([a, b], lv) => {
        const fast = singleBetaHpd(a, b, lv, logBeta(a, b));
        const slow = hpdRegionByLevelSet([{ weight: 1, a, b }], lv);
        // The solver may decline (null) only where an end lies below 1e-290, at the edge of doubles.
        if (fast === null) return slow.pieces.some((p) => [p.lower, p.upper].some((e) => e > 0 && e < 1e-290));
        if (fast.pieces.length !== slow.pieces.length) return false;
        if (Math.abs(fast.mass - lv) > 1e-10) return false;
        return fast.pieces.every(
          (p, i) => Math.abs(p.lower - slow.pieces[i].lower) < 1e-9 && Math.abs(p.upper - slow.pieces[i].upper) < 1e-9,
        );
      }),
      { seed: 20261202, numRuns: 400 },
    );
  });
});

describe("HPD shapes", () => {
  it("symmetric Beta(a, a): the HPD interval is the equal-tailed one (exact identity)", () => {
    const r = hpdRegion([{ weight: 1, a: 6, b: 6 }], 0.9);
    expect(Math.abs(r.pieces[0].lower - betaQuantile(0.05, 6, 6))).toBeLessThan(1e-9);
    expect(Math.abs(r.pieces[0].upper - betaQuantile(0.95, 6, 6))).toBeLessThan(1e-9);
  });
  it("J-shaped Beta(1, 13) (0 of 12, uniform prior): [0, 1 - 0.05^(1/13)] (exact identity)", () => {
    const r = hpdRegion([{ weight: 1, a: 1, b: 13 }], 0.95);
    expect(r.pieces).toHaveLength(1);
    expect(r.pieces[0].lower).toBe(0);
    expect(Math.abs(r.pieces[0].upper - (1 - 0.05 ** (1 / 13)))).toBeLessThan(1e-13);
  });
  it("J-shaped Beta(13, 1) (12 of 12): ends at 1 with lower 0.05^(1/13) (exact identity)", () => {
    const r = hpdRegion([{ weight: 1, a: 13, b: 1 }], 0.95);
    expect(r.pieces[0].upper).toBe(1);
    expect(Math.abs(r.pieces[0].lower - 0.05 ** (1 / 13))).toBeLessThan(1e-13);
  });
  it("U-shaped Beta(0.5, 0.5): two pieces [0, l] and [1 - l, 1], each holding half the mass by symmetry", () => {
    const m: MixtureBeta = [{ weight: 1, a: 0.5, b: 0.5 }];
    const r = hpdRegion(m, 0.95);
    expect(r.pieces).toHaveLength(2);
    expect(r.pieces[0].lower).toBe(0);
    expect(r.pieces[1].upper).toBe(1);
    expect(Math.abs(r.pieces[0].upper - (1 - r.pieces[1].lower))).toBeLessThan(1e-10);
    // Beta(1/2, 1/2) is the arcsine law: F(p) = (2/pi) asin(sqrt(p)), so l = sin^2(pi * 0.475 / 2).
    expect(Math.abs(r.pieces[0].upper - Math.sin((Math.PI * 0.475) / 2) ** 2)).toBeLessThan(1e-10);
    expect(r.note).toMatch(/two pieces/);
  });
  it("U-shaped asymmetric Beta(0.3, 0.6): two pieces, equal density at the inner ends, stated mass", () => {
    const m: MixtureBeta = [{ weight: 1, a: 0.3, b: 0.6 }];
    const r = hpdRegion(m, 0.8);
    expect(r.pieces).toHaveLength(2);
    const f1 = betaPdf(r.pieces[0].upper, 0.3, 0.6);
    const f2 = betaPdf(r.pieces[1].lower, 0.3, 0.6);
    expect(Math.abs(f1 / f2 - 1)).toBeLessThan(1e-8);
    expect(Math.abs(regionMass(m, r.pieces) - 0.8)).toBeLessThan(1e-10);
  });
  it("flat Beta(1, 1): no unique HPD, the equal-tailed interval with a note", () => {
    const r = hpdRegion([{ weight: 1, a: 1, b: 1 }], 0.9);
    expect(r.pieces).toHaveLength(1);
    expect(r.pieces[0].lower).toBeCloseTo(0.05, 15);
    expect(r.pieces[0].upper).toBeCloseTo(0.95, 15);
    expect(r.note).toMatch(/flat/);
  });
  it("bimodal mixture: two pieces with equal density at all four ends", () => {
    const m: MixtureBeta = [
      { weight: 0.5, a: 30, b: 70 },
      { weight: 0.5, a: 70, b: 30 },
    ];
    const r = hpdRegion(m, 0.9);
    expect(r.pieces).toHaveLength(2);
    const ends = r.pieces.flatMap((p) => [p.lower, p.upper]).map((e) => mixtureDensity(m, e));
    for (const f of ends) expect(Math.abs(f / ends[0] - 1)).toBeLessThan(1e-8);
    expect(Math.abs(regionMass(m, r.pieces) - 0.9)).toBeLessThan(1e-10);
  });
  it("rule: level must lie strictly between 0 and 1", () => {
    expect(() => hpdRegion([{ weight: 1, a: 2, b: 2 }], 1)).toThrow(StatsDomainError);
    expect(() => hpdRegion([{ weight: 1, a: 2, b: 2 }], NaN)).toThrow(StatsDomainError);
  });
});
