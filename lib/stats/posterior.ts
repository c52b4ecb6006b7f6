/**
 * Posterior summaries for one response (or toxicity) rate under a mixture-of-Betas prior.
 */
import type { MixtureBeta } from "./types";
import { betaPdfUnchecked, betaQuantileUnchecked, logBetaUnchecked } from "./distributions";
import { hpdRegionUnchecked, mixtureQuantileUnchecked, type CredibleRegion } from "./hpd";
import { mixtureCdf, mixtureMean, mixtureSurvival, requireMixture, updateMixture } from "./priors";
import { requireCount, requireData, requireFinite, requireProbability, StatsDomainError } from "./validate";

export type PosteriorSummary = {
  /** The posterior mixture (one component for a single-Beta prior). */
  components: MixtureBeta;
  level: number;
  mean: number;
  median: number;
  /** Null when the density has no finite maximum or no unique one (flat, U-shaped, unbounded at an end); see modeNote. */
  mode: number | null;
  modeNote?: string;
  sd: number;
  /** Quantiles (1 - level) / 2 and (1 + level) / 2. */
  equalTailed: { lower: number; upper: number };
  hpd: CredibleRegion;
  /** P(p > p0 | data), present when p0 was given. */
  probAboveP0?: number;
};

/**
 * Quantile of a posterior mixture.
 * @param post mixture of Betas (weights in [0, 1] summing to 1, shapes > 0)
 * @param q probability in [0, 1]; 0 gives 0 and 1 gives 1
 * @returns the smallest p with P(rate <= p) >= q (the Beta quantile for one component)
 */
export function mixtureQuantile(post: MixtureBeta, q: number): number {
  requireMixture("posterior", post);
  requireProbability("q", q, { closed: true });
  return mixtureQuantileUnchecked(post, q);
}

/**
 * P(lo < p <= hi) = F(hi) - F(lo) for a posterior mixture.
 * @param post mixture of Betas
 * @param lo lower end, in [0, 1]
 * @param hi upper end, in [lo, 1]
 */
export function probInInterval(post: MixtureBeta, lo: number, hi: number): number {
  requireMixture("posterior", post);
  requireProbability("lo", lo, { closed: true });
  requireProbability("hi", hi, { closed: true });
  if (hi < lo) throw new StatsDomainError("hi", hi, `must not be below lo = ${lo}`);
  // Subtract on the tail where both terms are small, so a narrow upper interval keeps its digits.
  const fl = mixtureCdf(post, lo);
  if (fl > 0.5) return Math.max(0, mixtureSurvival(post, lo) - mixtureSurvival(post, hi));
  return Math.max(0, mixtureCdf(post, hi) - fl);
}

function gridPoints(points: number): number[] {
  requireCount("points", points);
  if (points < 2 || points > 100_000) throw new StatsDomainError("points", points, "must be an integer from 2 to 100000");
  return Array.from({ length: points }, (_, i) => (i === points - 1 ? 1 : i / (points - 1)));
}

/**
 * Posterior density on `points` equally spaced rates from 0 to 1, for plotting.
 * Where the density is infinite (a shape parameter below 1 at that end) the value is clipped to the
 * density one thousandth of a grid step inside, and the end is listed in `unboundedAt`.
 * @param post mixture of Betas
 * @param points number of grid values, an integer from 2 to 100000
 */
export function densityGrid(post: MixtureBeta, points: number): { p: number[]; density: number[]; unboundedAt: Array<0 | 1> } {
  requireMixture("posterior", post);
  const p = gridPoints(points);
  const live = post.filter((c) => c.weight > 0).map((c) => ({ ...c, lb: logBetaUnchecked(c.a, c.b) }));
  const f = (x: number) => live.reduce((s, c) => s + c.weight * betaPdfUnchecked(x, c.a, c.b, c.lb), 0);
  const inset = 1e-3 / (points - 1);
  const unboundedAt: Array<0 | 1> = [];
  const density = p.map((x, i) => {
    const v = f(x);
    if (Number.isFinite(v)) return v;
    unboundedAt.push(i === 0 ? 0 : 1);
    return f(i === 0 ? inset : 1 - inset);
  });
  return { p, density, unboundedAt };
}

/**
 * Posterior CDF P(rate <= p) on `points` equally spaced rates from 0 to 1, for plotting.
 * @param post mixture of Betas
 * @param points number of grid values, an integer from 2 to 100000
 */
export function cdfGrid(post: MixtureBeta, points: number): { p: number[]; cdf: number[] } {
  requireMixture("posterior", post);
  const p = gridPoints(points);
  return { p, cdf: p.map((x) => mixtureCdf(post, x)) };
}

function modeOf(post: MixtureBeta): { mode: number | null; note?: string } {
  const live = post.filter((c) => c.weight > 0);
  if (live.every((c) => c.a === 1 && c.b === 1)) return { mode: null, note: "Flat posterior: every rate is equally dense, so there is no mode." };
  if (live.some((c) => c.a < 1) && live.some((c) => c.b < 1))
    return { mode: null, note: "U-shaped posterior: the density is unbounded at both 0 and 1, so there is no mode." };
  if (live.some((c) => c.a < 1)) return { mode: null, note: "The density is unbounded at 0 (a shape parameter below 1): no finite mode; the posterior piles up at 0." };
  if (live.some((c) => c.b < 1)) return { mode: null, note: "The density is unbounded at 1 (a shape parameter below 1): no finite mode; the posterior piles up at 1." };
  if (live.length === 1) {
    const { a, b } = live[0];
    // a, b >= 1, not both 1: (a - 1) / (a + b - 2) is 0 or 1 for a J-shape, where the density is finite and largest.
    return { mode: (a - 1) / (a + b - 2) };
  }
  // Mixture: the highest grid point of the density, refined by golden-section search around it.
  const lb = live.map((c) => logBetaUnchecked(c.a, c.b));
  const f = (x: number) => live.reduce((s, c, i) => s + c.weight * betaPdfUnchecked(x, c.a, c.b, lb[i]), 0);
  const cands = new Set<number>([0, 1]);
  for (let i = 1; i < 2000; i++) cands.add(i / 2000);
  for (const c of live) {
    const mean = c.a / (c.a + c.b);
    const sd = Math.sqrt((c.a * c.b) / ((c.a + c.b) ** 2 * (c.a + c.b + 1)));
    for (let j = -40; j <= 40; j++) {
      const x = mean + (j / 8) * sd;
      if (x > 0 && x < 1) cands.add(x);
    }
  }
  const xs = [...cands].sort((u, v) => u - v);
  let k = 0;
  for (let i = 1; i < xs.length; i++) if (f(xs[i]) > f(xs[k])) k = i;
  let lo = xs[Math.max(0, k - 1)];
  let hi = xs[Math.min(xs.length - 1, k + 1)];
  const gr = (Math.sqrt(5) - 1) / 2;
  for (let i = 0; i < 200 && hi - lo > 1e-15; i++) {
    const x1 = hi - gr * (hi - lo);
    const x2 = lo + gr * (hi - lo);
    if (f(x1) >= f(x2)) hi = x2;
    else lo = x1;
  }
  const mode = 0.5 * (lo + hi);
  // Count separated local maxima on the grid to warn about a multimodal mixture.
  let peaks = 0;
  for (let i = 1; i < xs.length - 1; i++) if (f(xs[i]) > f(xs[i - 1]) && f(xs[i]) >= f(xs[i + 1])) peaks++;
  return peaks > 1 ? { mode, note: "The mixture posterior is multimodal; this is the highest mode." } : { mode };
}

/**
 * Posterior summary after x responders of n under a mixture prior.
 * @param prior prior mixture of Betas (weights in [0, 1] summing to 1, shapes > 0)
 * @param x responders, an integer with 0 <= x <= n
 * @param n evaluable patients, a non-negative integer
 * @param opts.level credible level strictly between 0 and 1 (default 0.95)
 * @param opts.p0 reference rate strictly between 0 and 1; when given, P(p > p0 | data) is reported
 */
export function posteriorSummary(
  prior: MixtureBeta,
  x: number,
  n: number,
  opts: { level?: number; p0?: number } = {},
): PosteriorSummary {
  requireMixture("prior", prior);
  requireData(x, n);
  const level = opts.level ?? 0.95;
  requireProbability("level", level);
  if (opts.p0 !== undefined) {
    requireFinite("p0", opts.p0);
    requireProbability("p0", opts.p0);
  }
  const components = updateMixture(prior, x, n);
  const mean = mixtureMean(components);
  const second = components.reduce((s, c) => s + (c.weight * c.a * (c.a + 1)) / ((c.a + c.b) * (c.a + c.b + 1)), 0);
  const sd = Math.sqrt(Math.max(0, second - mean * mean));
  const alpha = 1 - level;
  const { mode, note } = modeOf(components);
  const live = components.filter((c) => c.weight > 0);
  // One component (the usual case): ln B once, Beta quantiles directly, and the equal-tailed ends
  // handed to the HPD solver as its starting point. Inputs are validated above, so the unchecked
  // forms skip a second round of validation.
  let quantile: (q: number) => number;
  if (live.length === 1) {
    const { a, b } = live[0];
    const lb = logBetaUnchecked(a, b);
    quantile = (q) => betaQuantileUnchecked(q, a, b, lb);
  } else quantile = (q) => mixtureQuantileUnchecked(components, q);
  const equalTailed = { lower: quantile(alpha / 2), upper: quantile(1 - alpha / 2) };
  const summary: PosteriorSummary = {
    components,
    level,
    mean,
    median: quantile(0.5),
    mode,
    ...(note ? { modeNote: note } : {}),
    sd,
    equalTailed,
    hpd: hpdRegionUnchecked(components, level, live.length === 1 ? equalTailed : undefined),
  };
  if (opts.p0 !== undefined) summary.probAboveP0 = mixtureSurvival(components, opts.p0);
  return summary;
}
