/**
 * Priors on a rate and their conjugate updating, as mixtures of Beta components.
 * A single Beta is a one-component mixture, so every computation has one code path.
 */
import type { MixtureBeta, PriorSpec } from "./types";
import { betaCdf, betaSurvival, logBeta, logChoose } from "./distributions";
import { requireData, requireFinite, requirePositive, requireProbability, StatsDomainError } from "./validate";

/**
 * A resolved mixture is usable when it has at least one component, every weight is in [0, 1],
 * every shape is finite and > 0, and the weights sum to 1 within 1e-9 (they come from
 * renormalisation, so exact 1 cannot be demanded).
 */
export function requireMixture(name: string, m: MixtureBeta): void {
  if (!Array.isArray(m) || m.length === 0) throw new StatsDomainError(name, m, "must be a non-empty list of Beta components");
  let total = 0;
  m.forEach((c, i) => {
    requirePositive(`${name}[${i}].a`, c.a);
    requirePositive(`${name}[${i}].b`, c.b);
    requireFinite(`${name}[${i}].weight`, c.weight);
    if (c.weight < 0 || c.weight > 1) throw new StatsDomainError(`${name}[${i}].weight`, c.weight, "must lie in [0, 1]");
    total += c.weight;
  });
  if (Math.abs(total - 1) > 1e-9) throw new StatsDomainError(`${name} weights`, total, "must sum to 1");
}

/** The vague component of a robust mixture (Schmidli et al. 2014 use a unit-information prior; Cairn uses Beta(1, 1)). */
export const VAGUE_COMPONENT = { a: 1, b: 1 } as const;

/** Resolve a prior specification to its mixture-of-Betas form. */
export function resolvePrior(spec: PriorSpec): MixtureBeta {
  switch (spec.family) {
    case "uniform":
      return [{ weight: 1, a: 1, b: 1 }];
    case "jeffreys":
      return [{ weight: 1, a: 0.5, b: 0.5 }];
    case "beta":
      requirePositive("a", spec.a);
      requirePositive("b", spec.b);
      return [{ weight: 1, a: spec.a, b: spec.b }];
    case "informative": {
      requireProbability("mean", spec.mean);
      requirePositive("ess", spec.ess);
      return [{ weight: 1, a: spec.mean * spec.ess, b: (1 - spec.mean) * spec.ess }];
    }
    case "robustMixture": {
      requireProbability("mean", spec.mean);
      requirePositive("ess", spec.ess);
      requireProbability("weight", spec.weight, { closed: true });
      const informative = { weight: spec.weight, a: spec.mean * spec.ess, b: (1 - spec.mean) * spec.ess };
      const vague = { weight: 1 - spec.weight, ...VAGUE_COMPONENT };
      return [informative, vague].filter((c) => c.weight > 0);
    }
    default:
      throw new StatsDomainError("prior.family", (spec as { family: unknown }).family, "is not a known prior family");
  }
}

/**
 * Posterior after x responders of n: each component updates to Beta(a + x, b + n - x) and its
 * weight is multiplied by the component's marginal likelihood of the data (beta-binomial), then
 * renormalised. The binomial coefficient is common to all components, but kept for clarity.
 */
export function updateMixture(prior: MixtureBeta, x: number, n: number): MixtureBeta {
  requireData(x, n);
  const logW = prior.map(
    (c) => Math.log(c.weight) + logChoose(n, x) + logBeta(c.a + x, c.b + n - x) - logBeta(c.a, c.b),
  );
  const max = Math.max(...logW);
  const w = logW.map((l) => Math.exp(l - max));
  const total = w.reduce((s, v) => s + v, 0);
  return prior.map((c, i) => ({ weight: w[i] / total, a: c.a + x, b: c.b + n - x }));
}

/** P(p <= t) under a mixture. */
export function mixtureCdf(m: MixtureBeta, t: number): number {
  return m.reduce((s, c) => s + c.weight * betaCdf(t, c.a, c.b), 0);
}

/** P(p > t) under a mixture, accurate in the upper tail. */
export function mixtureSurvival(m: MixtureBeta, t: number): number {
  return m.reduce((s, c) => s + c.weight * betaSurvival(t, c.a, c.b), 0);
}

/** Mixture mean. */
export function mixtureMean(m: MixtureBeta): number {
  return m.reduce((s, c) => s + (c.weight * c.a) / (c.a + c.b), 0);
}

/**
 * Effective sample size of a prior on a rate, in patients.
 * - One Beta(a, b): a + b (the prior is worth a + b binomial observations; common practice, and the
 *   single-Beta case of Morita, Thall & Mueller 2008).
 * - A mixture: the moment-matched a + b, m (1 - m) / v - 1, where m and v are the mixture's mean
 *   and variance: the size of the single Beta with the same mean and spread. This is NOT the
 *   Morita, Thall & Mueller (2008) definition (which matches curvature at the prior mean); it agrees
 *   with a + b for one component and shrinks as the components disagree, so a robust mixture is
 *   shown as worth fewer patients than its informative part.
 * @param prior a prior specification (validated as in resolvePrior) or a resolved mixture (weights in [0, 1] summing to 1, shapes > 0)
 * @returns a positive number of patients
 */
export function priorEffectiveSampleSize(prior: PriorSpec | MixtureBeta): number {
  const m = Array.isArray(prior) ? prior : resolvePrior(prior);
  requireMixture("prior", m);
  const live = m.filter((c) => c.weight > 0);
  if (live.length === 1) return live[0].a + live[0].b;
  const mean = mixtureMean(live);
  const second = live.reduce((s, c) => s + (c.weight * c.a * (c.a + 1)) / ((c.a + c.b) * (c.a + c.b + 1)), 0);
  const variance = second - mean * mean;
  return (mean * (1 - mean)) / variance - 1;
}
