/**
 * The review's view of lib/stats' posterior summaries: one place that picks the engine's functions
 * (posterior.ts, hpd.ts, frequentist.ts) and shapes their results for the closed review.
 */
import { cdfGrid, densityGrid, posteriorSummary, probInInterval, type PosteriorSummary as EngineSummary } from "@/lib/stats/posterior";
import type { CredibleRegion } from "@/lib/stats/hpd";
import { clopperPearsonInterval, wilsonInterval } from "@/lib/stats/frequentist";
import type { MixtureBeta } from "@/lib/stats/types";
import { requireData, StatsDomainError } from "@/lib/stats/validate";

/** The engine's HPD region, plus a flag for the flat posterior whose HPD interval is not unique (the equal-tailed one is given). */
export type HpdRegion = CredibleRegion & { notUnique: boolean };
export type PosteriorSummary = Omit<EngineSummary, "hpd"> & { hpd: HpdRegion };
export type Interval = { lower: number; upper: number };
export type Curves = { p: number[]; density: number[]; cdf: number[]; unboundedAt: Array<0 | 1> };

/** Posterior summaries after x of n under `prior` at credible level `level`; P(p > p0) when p0 is given. */
export function summarisePosterior(prior: MixtureBeta, x: number, n: number, level: number, p0?: number): PosteriorSummary {
  const s = posteriorSummary(prior, x, n, p0 === undefined ? { level } : { level, p0 });
  const flat = s.components.every((c) => c.weight === 0 || (c.a === 1 && c.b === 1));
  return { ...s, hpd: { ...s.hpd, notUnique: flat } };
}

/** Clopper-Pearson exact interval (Clopper & Pearson 1934); with no patients yet it is all of [0, 1]. */
export function clopperPearson(x: number, n: number, level: number): Interval {
  requireData(x, n);
  return n === 0 ? { lower: 0, upper: 1 } : clopperPearsonInterval(x, n, level);
}

/** Wilson score interval (Wilson 1927; Brown, Cai & DasGupta 2001); with no patients yet it is all of [0, 1]. */
export function wilson(x: number, n: number, level: number): Interval {
  requireData(x, n);
  return n === 0 ? { lower: 0, upper: 1 } : wilsonInterval(x, n, level);
}

/** Density (clipped where infinite, ends listed) and cumulative curve on `points` rates from 0 to 1. */
export function mixtureCurves(m: MixtureBeta, points: number): Curves {
  const d = densityGrid(m, points);
  return { p: d.p, density: d.density, unboundedAt: d.unboundedAt, cdf: cdfGrid(m, points).cdf };
}

/** P(lo < p <= hi | data); 0 <= lo < hi <= 1. */
export function mixtureIntervalProbability(m: MixtureBeta, lo: number, hi: number): number {
  if (!(lo < hi)) throw new StatsDomainError("lo", lo, `must be below hi = ${hi}`);
  return probInInterval(m, lo, hi);
}
