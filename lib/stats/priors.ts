/**
 * Priors on a rate and their conjugate updating, as mixtures of Beta components.
 * A single Beta is a one-component mixture, so every computation has one code path.
 */
import type { MixtureBeta, PriorSpec } from "./types";
import { betaCdf, betaPdf, betaSurvival, logBeta, logChoose } from "./distributions";
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
const VAGUE_COMPONENT = { a: 1, b: 1 } as const;

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
 * Effective sample size (ESS) of a prior on a rate, in patients, as defined by Morita, Thall &
 * Mueller (2008, Biometrics 64:595-602): the number m of binary observations that, added to an
 * epsilon-information prior q0 with the same mean mu, gives a posterior whose curvature
 * -d^2/dt^2 log q_m(t | Y) at t = mu, averaged over the prior predictive distribution of Y, equals
 * the prior's own curvature D_p(mu) = -d^2/dt^2 log p(t) at mu.
 *
 * For the Beta-binomial model with q0 = Beta(c mu, c (1 - mu)) the averaged curvature is
 * (c + m)(1/mu + 1/(1 - mu)) - 1/mu^2 - 1/(1 - mu)^2, because it is linear in Y and E(Y) = m mu
 * under any prior with mean mu (mixtures included). Letting c -> 0 (the epsilon-information prior)
 * m solves a linear equation. For one Beta(a, b) this gives exactly a + b, the paper's result for
 * conjugate beta priors. The paper minimises |D_p - D_q(m)| over integers m >= 0; Cairn reports the
 * continuous root (its rounding is the paper's integer) and 0 when the root is negative (a mixture
 * whose log density is convex at its mean, e.g. two well-separated components), which is the
 * minimiser over m >= 0.
 * @param prior a prior specification (validated as in resolvePrior) or a resolved mixture (weights in [0, 1] summing to 1, shapes > 0)
 * @returns a number of patients >= 0
 */
export function moritaEffectiveSampleSize(prior: PriorSpec | MixtureBeta): number {
  const m = Array.isArray(prior) ? prior : resolvePrior(prior);
  requireMixture("prior", m);
  const live = m.filter((c) => c.weight > 0);
  if (live.length === 1) return live[0].a + live[0].b;
  const mu = mixtureMean(live);
  const curvature = negLogDensityCurvature(live, mu);
  const ess = (curvature + 1 / (mu * mu) + 1 / ((1 - mu) * (1 - mu))) / (1 / mu + 1 / (1 - mu));
  return Number.isFinite(ess) && ess > 0 ? ess : 0;
}

/** The ESS Cairn shows for a prior: Morita, Thall & Mueller (2008). See moritaEffectiveSampleSize. */
export const priorEffectiveSampleSize = moritaEffectiveSampleSize;

/**
 * -d^2/dt^2 log p(t) of a Beta mixture at t in (0, 1), from the analytic first and second
 * derivatives of each component's log density (weights times densities, so no log-sum-exp is needed
 * for the shapes the product allows).
 */
export function negLogDensityCurvature(prior: MixtureBeta, t: number): number {
  requireProbability("t", t);
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

/**
 * Moment-matched effective sample size: a + b of the single Beta with the mixture's mean m and
 * variance v, i.e. m (1 - m) / v - 1. NOT the Morita, Thall & Mueller (2008) definition; kept for
 * comparison only (it equals a + b for one component and shrinks as the components disagree).
 */
export function momentMatchedEffectiveSampleSize(prior: PriorSpec | MixtureBeta): number {
  const m = Array.isArray(prior) ? prior : resolvePrior(prior);
  requireMixture("prior", m);
  const live = m.filter((c) => c.weight > 0);
  if (live.length === 1) return live[0].a + live[0].b;
  const mean = mixtureMean(live);
  const second = live.reduce((s, c) => s + (c.weight * c.a * (c.a + 1)) / ((c.a + c.b) * (c.a + c.b + 1)), 0);
  const variance = second - mean * mean;
  return (mean * (1 - mean)) / variance - 1;
}
