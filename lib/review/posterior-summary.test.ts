/**
 * The review's posterior summaries (taken from lib/stats) checked against the @stdlib reference
 * distributions (@stdlib/stats-base-dists-beta-{cdf,pdf,quantile}, independent of lib/stats) and
 * exact identities, for the shapes the review must handle: interior, J-shaped, U-shaped and flat.
 */
import { describe, expect, it } from "vitest";
import stdlibBetaCdf from "@stdlib/stats-base-dists-beta-cdf";
import stdlibBetaPdf from "@stdlib/stats-base-dists-beta-pdf";
import stdlibBetaQuantile from "@stdlib/stats-base-dists-beta-quantile";
import { clopperPearson, mixtureCurves, mixtureIntervalProbability, summarisePosterior } from "./posterior-summary";
import { StatsDomainError } from "@/lib/stats/validate";

const close = (actual: number, expected: number, tol: number) => {
  expect(Math.abs(actual - expected), `expected ${expected}, got ${actual}, tolerance ${tol}`).toBeLessThanOrEqual(tol);
};
const beta = (a: number, b: number) => [{ weight: 1, a, b }];

describe("summaries of one Beta posterior", () => {
  // Prior Beta(0.6, 0.4), 6 responders of 20: posterior Beta(6.6, 14.4).
  const s = summarisePosterior(beta(0.6, 0.4), 6, 20, 0.95, 0.2);

  it("mean, SD and mode follow the Beta formulas (exact identities)", () => {
    close(s.mean, 6.6 / 21, 1e-14);
    close(s.sd, Math.sqrt((6.6 * 14.4) / (21 * 21 * 22)), 1e-14);
    close(s.mode as number, 5.6 / 19, 1e-12);
  });

  it("median, equal-tailed interval and P(p > p0) match @stdlib", () => {
    close(s.median, stdlibBetaQuantile(0.5, 6.6, 14.4), 1e-9);
    close(s.equalTailed.lower, stdlibBetaQuantile(0.025, 6.6, 14.4), 1e-9);
    close(s.equalTailed.upper, stdlibBetaQuantile(0.975, 6.6, 14.4), 1e-9);
    close(s.probAboveP0 as number, 1 - stdlibBetaCdf(0.2, 6.6, 14.4), 1e-10);
  });

  it("the HPD interval holds 95%, has equal density at its ends (@stdlib) and is no wider than the equal-tailed one", () => {
    expect(s.hpd.pieces).toHaveLength(1);
    expect(s.hpd.notUnique).toBe(false);
    const { lower, upper } = s.hpd.pieces[0];
    close(stdlibBetaCdf(upper, 6.6, 14.4) - stdlibBetaCdf(lower, 6.6, 14.4), 0.95, 1e-8);
    close(stdlibBetaPdf(lower, 6.6, 14.4) / stdlibBetaPdf(upper, 6.6, 14.4), 1, 1e-4);
    expect(upper - lower).toBeLessThanOrEqual(s.equalTailed.upper - s.equalTailed.lower);
  });

  it("a U-shaped posterior has a two-piece HPD region; for Beta(0.5, 0.5) it is [0, sin^2(pi*level/4)] and its mirror (arcsine CDF identity)", () => {
    const u = summarisePosterior(beta(0.5, 0.5), 0, 0, 0.8);
    expect(u.hpd.pieces).toHaveLength(2);
    const L = Math.sin((Math.PI * 0.8) / 4) ** 2;
    close(u.hpd.pieces[0].upper, L, 1e-6);
    close(u.hpd.pieces[1].lower, 1 - L, 1e-6);
  });

  it("a J-shaped posterior puts the HPD interval against the end where the density is infinite", () => {
    const j = summarisePosterior(beta(0.6, 0.4), 0, 5, 0.95); // Beta(0.6, 5.4)
    close(j.hpd.pieces[0].lower, 0, 0);
    close(j.hpd.pieces[0].upper, stdlibBetaQuantile(0.95, 0.6, 5.4), 1e-9);
  });

  it("a flat posterior has no unique HPD interval: flagged, with the equal-tailed interval", () => {
    const f = summarisePosterior(beta(1, 1), 0, 0, 0.95);
    expect(f.hpd.notUnique).toBe(true);
    close(f.hpd.pieces[0].lower, 0.025, 1e-12);
    close(f.hpd.pieces[0].upper, 0.975, 1e-12);
  });
});

describe("curves and interval questions", () => {
  it("density and cumulative curves match @stdlib on the grid, with an infinite end clipped and listed", () => {
    const c = mixtureCurves(beta(6.6, 14.4), 101);
    for (const i of [10, 30, 50]) {
      close(c.density[i], stdlibBetaPdf(c.p[i], 6.6, 14.4), 1e-9);
      close(c.cdf[i], stdlibBetaCdf(c.p[i], 6.6, 14.4), 1e-10);
    }
    const j = mixtureCurves(beta(0.6, 5.4), 101);
    expect(j.unboundedAt).toEqual([0]);
    expect(Number.isFinite(j.density[0])).toBe(true);
  });
  it("P(lo < p <= hi) is F(hi) - F(lo) for a mixture, as @stdlib computes it, and lo >= hi is refused", () => {
    const mix = [
      { weight: 0.7, a: 12, b: 28 },
      { weight: 0.3, a: 2, b: 2 },
    ];
    const want = 0.7 * (stdlibBetaCdf(0.4, 12, 28) - stdlibBetaCdf(0.2, 12, 28)) + 0.3 * (stdlibBetaCdf(0.4, 2, 2) - stdlibBetaCdf(0.2, 2, 2));
    close(mixtureIntervalProbability(mix, 0.2, 0.4), want, 1e-12);
    expect(() => mixtureIntervalProbability(mix, 0.4, 0.2)).toThrow(StatsDomainError);
  });
});

describe("Clopper-Pearson interval (Clopper & Pearson 1934)", () => {
  it("with no responders the upper limit is 1 - (alpha/2)^(1/n), with all responders the lower limit is (alpha/2)^(1/n) (exact identities)", () => {
    const z = clopperPearson(0, 20, 0.95);
    expect(z.lower).toBe(0);
    close(z.upper, 1 - 0.025 ** (1 / 20), 1e-12);
    close(clopperPearson(20, 20, 0.95).lower, 0.025 ** (1 / 20), 1e-12);
  });
  it("6 of 20 at 95% is about (0.1189, 0.5428), as R's binom.test gives (values from memory), and equals @stdlib's Beta quantiles", () => {
    const ci = clopperPearson(6, 20, 0.95);
    close(ci.lower, stdlibBetaQuantile(0.025, 6, 15), 1e-10);
    close(ci.upper, stdlibBetaQuantile(0.975, 7, 14), 1e-10);
    close(ci.lower, 0.1189, 1e-4);
    close(ci.upper, 0.5428, 1e-4);
  });
  it("no patients yet gives [0, 1]; x > n is refused", () => {
    expect(clopperPearson(0, 0, 0.95)).toEqual({ lower: 0, upper: 1 });
    expect(() => clopperPearson(21, 20, 0.95)).toThrow(StatsDomainError);
  });
});
