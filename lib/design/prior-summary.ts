/**
 * What the design studio shows about a prior: its density on a grid and its effective sample size.
 * Pure (no server, no DOM), so the same numbers can be checked in unit tests.
 */
import type { MixtureBeta, PriorSpec } from "@/lib/stats/types";
import { resolvePrior, mixtureMean } from "@/lib/stats/priors";
import { betaPdf } from "@/lib/stats/distributions";

/**
 * Effective sample size of a prior on a rate, after Morita, Thall & Mueller (2008, Biometrics
 * 64:595-602): the number m of binary observations that, added to an epsilon-information prior
 * with the same mean mu, gives the same curvature of the log density at mu as the prior has.
 *
 * For the Beta-binomial model the expected curvature after m observations at mu is
 * (c + m)(1/mu + 1/(1 - mu)) - 1/mu^2 - 1/(1 - mu)^2 with c -> 0, so m solves a linear equation;
 * for a single Beta(a, b) it gives exactly a + b (the paper's worked beta example). A mixture
 * whose log density is convex at its mean (a bimodal mixture) has no positive solution: 0 is returned.
 * Morita et al. search integer m; Cairn reports the continuous solution (display only).
 */
export function effectiveSampleSize(prior: MixtureBeta): number {
  const mu = mixtureMean(prior);
  const curvature = negLogDensityCurvature(prior, mu);
  const m = (curvature + 1 / (mu * mu) + 1 / ((1 - mu) * (1 - mu))) / (1 / mu + 1 / (1 - mu));
  return Number.isFinite(m) && m > 0 ? m : 0;
}

/** -d^2/dt^2 log p(t) of a Beta mixture at t in (0, 1), from the analytic first and second derivatives. */
export function negLogDensityCurvature(prior: MixtureBeta, t: number): number {
  let p = 0;
  let d1 = 0;
  let d2 = 0;
  for (const c of prior) {
    const f = c.weight * betaPdf(t, c.a, c.b);
    const g = (c.a - 1) / t - (c.b - 1) / (1 - t);
    const gPrime = -(c.a - 1) / (t * t) - (c.b - 1) / ((1 - t) * (1 - t));
    p += f;
    d1 += f * g;
    d2 += f * (g * g + gPrime);
  }
  return -(d2 / p - (d1 / p) ** 2);
}

export type PriorSummary = {
  components: MixtureBeta;
  mean: number;
  ess: number;
  /** Density on an interior grid (ends trimmed: Jeffreys-type densities are infinite at 0 and 1). */
  density: { x: number[]; y: number[] };
};

export function summarisePrior(spec: PriorSpec, points = 199): PriorSummary {
  const components = resolvePrior(spec);
  const x: number[] = [];
  const y: number[] = [];
  for (let i = 1; i <= points; i++) {
    const t = i / (points + 1);
    x.push(t);
    y.push(components.reduce((s, c) => s + c.weight * betaPdf(t, c.a, c.b), 0));
  }
  return { components, mean: mixtureMean(components), ess: effectiveSampleSize(components), density: { x, y } };
}
