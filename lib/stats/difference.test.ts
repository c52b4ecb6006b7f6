import { describe, expect, it } from "vitest";
import fc from "fast-check";
import betaln from "@stdlib/math-base-special-betaln";
import stdlibBetaQuantile from "@stdlib/stats-base-dists-beta-quantile";
import mt19937 from "@stdlib/random-base-mt19937";
import { differenceDensityGrid, pairProbDifferenceExceeds, probDifferenceExceeds } from "./difference";
import { StatsDomainError } from "./validate";
import type { MixtureBeta } from "./types";

const beta = (a: number, b: number): MixtureBeta => [{ weight: 1, a, b }];

/**
 * Exact identity for integer aT: P(X > y) = I_{1-y}(bT, aT) = sum_{i=0}^{aT-1} y^i (1-y)^bT / ((bT + i) B(1 + i, bT)),
 * so integrating against the Beta(aC, bC) density,
 * P(pT > pC) = sum_{i=0}^{aT-1} B(aC + i, bC + bT) / ((bT + i) B(1 + i, bT) B(aC, bC)).
 * Evaluated with @stdlib/math-base-special-betaln (npm), independent of lib/stats.
 */
function exactProbTGreater(aT: number, bT: number, aC: number, bC: number): number {
  let s = 0;
  for (let i = 0; i < aT; i++) s += Math.exp(betaln(aC + i, bC + bT) - Math.log(bT + i) - betaln(1 + i, bT) - betaln(aC, bC));
  return s;
}

describe("probDifferenceExceeds: exact identity at delta = 0 for integer shapes", () => {
  const cases: Array<[number, number, number, number]> = [
    [8, 4, 5, 7],
    [1, 1, 1, 1],
    [31, 71, 21, 81],
    [1, 20, 1, 20],
    [201, 801, 151, 851],
    [3, 1, 1, 3],
    [1, 1000, 2, 999],
    [15, 6, 9, 12],
    [2, 39, 1, 40],
  ];
  for (const [aT, bT, aC, bC] of cases) {
    it(`Beta(${aT},${bT}) vs Beta(${aC},${bC}) within 1e-10`, () => {
      const exact = exactProbTGreater(aT, bT, aC, bC);
      expect(Math.abs(probDifferenceExceeds(beta(aT, bT), beta(aC, bC), 0) - exact)).toBeLessThan(1e-10);
    });
  }
});

describe("probDifferenceExceeds: exact identity for two uniform arms (triangular difference)", () => {
  // pT - pC with both Beta(1, 1) has density 1 - |d| on [-1, 1]: P(D > d) = (1 - d)^2 / 2 for d >= 0
  // and 1 - (1 + d)^2 / 2 for d < 0.
  for (const d of [-0.95, -0.5, -0.1, 0, 0.05, 0.3, 0.8, 0.999]) {
    it(`d = ${d}`, () => {
      const exact = d >= 0 ? (1 - d) ** 2 / 2 : 1 - (1 + d) ** 2 / 2;
      expect(Math.abs(probDifferenceExceeds(beta(1, 1), beta(1, 1), d) - exact)).toBeLessThan(1e-12);
    });
  }
});

describe("probDifferenceExceeds: symmetry P(pT - pC > d) + P(pC - pT > -d) = 1 (exact identity)", () => {
  const shapes: Array<[number, number, number, number]> = [
    [0.5, 0.5, 0.5, 0.5], // both U-shaped
    [0.05, 2000, 0.5, 10], // extreme J-shape against a Jeffreys-type posterior
    [0.3, 0.7, 2, 0.4],
    [12.5, 30.5, 8.5, 40.5],
    [400, 600, 380, 620],
    [1, 1, 0.2, 0.2],
  ];
  for (const [aT, bT, aC, bC] of shapes)
    for (const d of [-0.9, -0.3, 0, 0.02, 0.2, 0.7])
      it(`Beta(${aT},${bT}) vs Beta(${aC},${bC}), d = ${d}`, () => {
        const forward = probDifferenceExceeds(beta(aT, bT), beta(aC, bC), d);
        const backward = probDifferenceExceeds(beta(aC, bC), beta(aT, bT), -d);
        expect(Math.abs(forward + backward - 1)).toBeLessThan(1e-9);
      });
});

describe("probDifferenceExceeds: seeded Monte Carlo (within 4 SE)", () => {
  // Draws by inversion with @stdlib/stats-base-dists-beta-quantile on @stdlib/random-base-mt19937
  // uniforms (seed 20240611), so the check shares no code with lib/stats.
  const rng: () => number = (mt19937.factory({ seed: 20240611 }) as unknown as { normalized: () => number }).normalized;
  const draw = (m: MixtureBeta): number => {
    let u = rng();
    let k = 0;
    while (k < m.length - 1 && u >= m[k].weight) {
      u -= m[k].weight;
      k++;
    }
    return stdlibBetaQuantile(rng(), m[k].a, m[k].b);
  };
  const cases: Array<{ t: MixtureBeta; c: MixtureBeta; d: number }> = [
    { t: beta(14.5, 9.5), c: beta(9.5, 14.5), d: 0.1 },
    { t: beta(0.5, 20.5), c: beta(2.5, 18.5), d: -0.05 },
    {
      t: [
        { weight: 0.7, a: 18, b: 42 },
        { weight: 0.3, a: 4, b: 6 },
      ],
      c: beta(7, 23),
      d: 0,
    },
  ];
  for (const { t, c, d } of cases)
    it(`${JSON.stringify(t)} vs ${JSON.stringify(c)}, d = ${d}`, () => {
      const n = 40_000;
      let hits = 0;
      for (let i = 0; i < n; i++) if (draw(t) - draw(c) > d) hits++;
      const phat = hits / n;
      const p = probDifferenceExceeds(t, c, d);
      const se = Math.sqrt((p * (1 - p)) / n);
      expect(Math.abs(phat - p)).toBeLessThan(4 * se);
    });
});

describe("probDifferenceExceeds: mixtures are weight-averages of component pairs", () => {
  it("two-by-two mixture equals the weighted sum of the four pair probabilities", () => {
    const t: MixtureBeta = [
      { weight: 0.6, a: 20, b: 30 },
      { weight: 0.4, a: 2, b: 3 },
    ];
    const c: MixtureBeta = [
      { weight: 0.25, a: 10, b: 40 },
      { weight: 0.75, a: 1.5, b: 4 },
    ];
    // Integer-shape pairs use the exact identity; the rest the adaptive rule at a tight tolerance.
    let direct = 0;
    for (const x of t)
      for (const y of c)
        direct +=
          x.weight *
          y.weight *
          (Number.isInteger(x.a) && Number.isInteger(y.a)
            ? exactProbTGreater(x.a, x.b, y.a, y.b)
            : pairProbDifferenceExceeds(x.a, x.b, y.a, y.b, 0, 1e-12, true).value);
    expect(Math.abs(probDifferenceExceeds(t, c, 0) - direct)).toBeLessThan(1e-10);
  });
});

describe("pairProbDifferenceExceeds: fixed-order fast path against the adaptive rule", () => {
  it("agrees to 1e-9 over random shapes and margins (seeded)", () => {
    const shape = fc.oneof(
      fc.integer({ min: 1, max: 80 }),
      fc.integer({ min: 0, max: 400 }).map((k) => k + 0.5),
      fc.double({ min: 0.05, max: 3, noNaN: true }),
      fc.double({ min: 0, max: 8, noNaN: true }).map((u) => Math.exp(u)),
    );
    fc.assert(
      fc.property(shape, shape, shape, shape, fc.oneof(fc.double({ min: -0.99, max: 0.99, noNaN: true }), fc.double({ min: -1e-100, max: 1e-100, noNaN: true })), (aT, bT, aC, bC, d) => {
        const fast = pairProbDifferenceExceeds(aT, bT, aC, bC, d).value;
        const reference = pairProbDifferenceExceeds(aT, bT, aC, bC, d, 1e-12, true).value;
        return Math.abs(fast - reference) < 1e-9;
      }),
      { seed: 424242, numRuns: 400 },
    );
  });
});

describe("differenceDensityGrid", () => {
  it("matches the triangular density 1 - |d| of two uniform arms away from the kink at 0", () => {
    const { d, density } = differenceDensityGrid(beta(1, 1), beta(1, 1), 41);
    expect(d.length).toBe(41);
    for (let i = 1; i < 40; i++) {
      if (Math.abs(d[i]) < 1e-12) continue; // the cell at 0 averages across the kink
      expect(Math.abs(density[i] - (1 - Math.abs(d[i])))).toBeLessThan(1e-9);
    }
  });
  it("matches the convolution integral of the two densities (Simpson, 20000 panels) to O(h^2)", () => {
    const [aT, bT, aC, bC] = [8, 4, 5, 7];
    const pdf = (p: number, a: number, b: number) =>
      p <= 0 || p >= 1 ? 0 : Math.exp((a - 1) * Math.log(p) + (b - 1) * Math.log1p(-p) - betaln(a, b));
    const conv = (dd: number) => {
      const lo = Math.max(0, -dd);
      const hi = Math.min(1, 1 - dd);
      const m = 20000;
      const h = (hi - lo) / m;
      let s = 0;
      for (let k = 0; k <= m; k++) {
        const y = lo + k * h;
        const w = k === 0 || k === m ? 1 : k % 2 ? 4 : 2;
        s += w * pdf(y + dd, aT, bT) * pdf(y, aC, bC);
      }
      return (s * h) / 3;
    };
    const { d, density } = differenceDensityGrid(beta(aT, bT), beta(aC, bC), 401);
    for (let i = 0; i < d.length; i += 20) expect(Math.abs(density[i] - conv(d[i]))).toBeLessThan(2e-4);
  });
  it("stays finite for U-shaped arms", () => {
    const { density } = differenceDensityGrid(beta(0.3, 0.3), beta(0.4, 0.6), 101);
    for (const v of density) expect(Number.isFinite(v) && v >= 0).toBe(true);
  });
  it("rule: points must be an integer from 2 to 100000", () => {
    expect(() => differenceDensityGrid(beta(1, 1), beta(1, 1), 1)).toThrow(StatsDomainError);
    expect(() => differenceDensityGrid(beta(1, 1), beta(1, 1), 10.5)).toThrow(StatsDomainError);
  });
});

describe("probDifferenceExceeds: invalid input", () => {
  it("rule: delta must lie strictly between -1 and 1", () => {
    expect(() => probDifferenceExceeds(beta(1, 1), beta(1, 1), 1)).toThrow(StatsDomainError);
    expect(() => probDifferenceExceeds(beta(1, 1), beta(1, 1), -1)).toThrow(StatsDomainError);
  });
  it("rule: delta must be a finite number (NaN)", () => {
    expect(() => probDifferenceExceeds(beta(1, 1), beta(1, 1), NaN)).toThrow(StatsDomainError);
  });
  it("rule: mixture weights must sum to 1", () => {
    expect(() =>
      probDifferenceExceeds(
        [
          { weight: 0.5, a: 1, b: 1 },
          { weight: 0.4, a: 2, b: 2 },
        ],
        beta(1, 1),
        0,
      ),
    ).toThrow(StatsDomainError);
  });
  it("rule: shape parameters must be greater than 0", () => {
    expect(() => probDifferenceExceeds(beta(0, 1), beta(1, 1), 0)).toThrow(StatsDomainError);
    expect(() => probDifferenceExceeds(beta(1, 1), beta(1, -2), 0)).toThrow(StatsDomainError);
  });
  it("rule: a mixture must have at least one component", () => {
    expect(() => probDifferenceExceeds([], beta(1, 1), 0)).toThrow(StatsDomainError);
  });
});
