/**
 * What the design studio shows about a prior: its density on a grid and its effective sample size.
 * Pure (no server, no DOM), so the same numbers can be checked in unit tests.
 */
import type { MixtureBeta, PriorSpec } from "@/lib/stats/types";
import { resolvePrior, mixtureMean, moritaEffectiveSampleSize, negLogDensityCurvature } from "@/lib/stats/priors";
import { betaPdf } from "@/lib/stats/distributions";

/** The prior's effective sample size (Morita, Thall & Mueller 2008), computed in lib/stats. */
export const effectiveSampleSize = (prior: MixtureBeta): number => moritaEffectiveSampleSize(prior);
export { negLogDensityCurvature };

type PriorSummary = {
  components: MixtureBeta;
  mean: number;
  /** Effective sample size after Morita, Thall & Mueller (2008); 0 when the log density is convex at the mean. */
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
