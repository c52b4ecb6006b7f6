/**
 * Highest posterior density (HPD) regions for a rate whose posterior is a mixture of Betas:
 * the shortest region holding a given mass, i.e. {p : f(p) >= c} with c chosen so the region holds
 * the mass. It is one interval for a unimodal posterior, an interval starting at 0 or ending at 1
 * for a monotone (J-shaped) one, two pieces [0, l] and [u, 1] for a U-shaped one (both shape
 * parameters below 1), and possibly several pieces for a multimodal mixture. A flat posterior
 * (Beta(1, 1)) has no unique HPD region; the equal-tailed interval is returned with a note.
 */
import type { MixtureBeta } from "./types";
import { betaPdfUnchecked, betaQuantile, logBetaUnchecked } from "./distributions";
import { mixtureCdf, mixtureSurvival, requireMixture } from "./priors";
import { requireProbability } from "./validate";

export type CredibleRegion = {
  /** Disjoint intervals in increasing order. */
  pieces: Array<{ lower: number; upper: number }>;
  /** Posterior mass of the region (equals the level to about 1e-12). */
  mass: number;
  note?: string;
};

type Prepared = { w: number; a: number; b: number; lb: number }[];

function prepare(post: MixtureBeta): Prepared {
  return post.filter((c) => c.weight > 0).map((c) => ({ w: c.weight, a: c.a, b: c.b, lb: logBetaUnchecked(c.a, c.b) }));
}

function density(m: Prepared, p: number): number {
  let s = 0;
  for (const c of m) s += c.w * betaPdfUnchecked(p, c.a, c.b, c.lb);
  return s;
}

/** P(lo < p <= hi) with the subtraction done on the tail that keeps it accurate. */
function massBetween(post: MixtureBeta, lo: number, hi: number): number {
  const fl = mixtureCdf(post, lo);
  if (fl > 0.5) return Math.max(0, mixtureSurvival(post, lo) - mixtureSurvival(post, hi));
  return Math.max(0, mixtureCdf(post, hi) - fl);
}

/** Quantile of a mixture (bisection on the mixture CDF); q in [0, 1]. */
export function mixtureQuantileUnchecked(post: MixtureBeta, q: number): number {
  const live = post.filter((c) => c.weight > 0);
  if (q <= 0) return 0;
  if (q >= 1) return 1;
  if (live.length === 1) return betaQuantile(q, live[0].a, live[0].b);
  // The mixture quantile lies between the smallest and largest component quantiles.
  const qs = live.map((c) => betaQuantile(q, c.a, c.b));
  let lo = Math.min(...qs);
  let hi = Math.max(...qs);
  const upperTail = q > 0.5;
  for (let i = 0; i < 200 && hi - lo > 1e-16 * Math.max(hi, 1e-300); i++) {
    const mid = lo > 0 && hi / lo > 16 ? Math.sqrt(lo * hi) : 0.5 * (lo + hi);
    const below = upperTail ? mixtureSurvival(post, mid) > 1 - q : mixtureCdf(post, mid) < q;
    if (below) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Points at which the level set {f >= c} is inspected; fine enough that no component's peak falls between two. */
function inspectionGrid(m: Prepared): number[] {
  const pts = new Set<number>([0, 1]);
  for (let i = 1; i < 400; i++) pts.add(i / 400);
  for (let k = 1; k <= 300; k++) pts.add(Math.pow(10, -k));
  for (let k = 1; k <= 15; k++) pts.add(1 - Math.pow(10, -k));
  for (const c of m) {
    const mean = c.a / (c.a + c.b);
    const sd = Math.sqrt((c.a * c.b) / ((c.a + c.b) ** 2 * (c.a + c.b + 1)));
    for (let j = -60; j <= 60; j++) {
      const p = mean + (j / 4) * sd;
      if (p > 0 && p < 1) pts.add(p);
    }
    if (c.a > 1 && c.b > 1) pts.add((c.a - 1) / (c.a + c.b - 2));
  }
  return [...pts].sort((x, y) => x - y);
}

/** The pieces of {f >= c}, endpoints refined by bisection on the density. */
function levelSet(m: Prepared, grid: number[], dens: number[], c: number): Array<{ lower: number; upper: number }> {
  const pieces: Array<{ lower: number; upper: number }> = [];
  const crossing = (x0: number, x1: number, rising: boolean) => {
    let lo = x0;
    let hi = x1;
    for (let i = 0; i < 200 && hi - lo > 2e-16 * Math.max(hi, 1e-300); i++) {
      const mid = lo > 0 && hi / lo > 16 ? Math.sqrt(lo * hi) : 0.5 * (lo + hi);
      if (mid <= lo || mid >= hi) break;
      const above = density(m, mid) >= c;
      if (above === rising) hi = mid;
      else lo = mid;
    }
    return 0.5 * (lo + hi);
  };
  let start: number | null = dens[0] >= c ? 0 : null;
  for (let i = 1; i < grid.length; i++) {
    const was = dens[i - 1] >= c;
    const is = dens[i] >= c;
    if (!was && is) start = crossing(grid[i - 1], grid[i], true);
    if (was && !is && start !== null) {
      pieces.push({ lower: start, upper: crossing(grid[i - 1], grid[i], false) });
      start = null;
    }
  }
  if (start !== null) pieces.push({ lower: start, upper: 1 });
  return pieces;
}

/**
 * The HPD region of a posterior mixture at a level.
 * @param post posterior mixture of Betas (weights in [0, 1] summing to 1, shapes > 0)
 * @param level credible mass, strictly between 0 and 1 (e.g. 0.95)
 * @returns pieces (one or more disjoint intervals), their mass, and a note for flat posteriors
 * (equal-tailed interval returned instead), U-shaped ones and multimodal mixtures.
 */
export function hpdRegion(post: MixtureBeta, level: number): CredibleRegion {
  requireMixture("posterior", post);
  requireProbability("level", level);
  const live = post.filter((c) => c.weight > 0);
  const alpha = 1 - level;

  // Shapes within 1e-9 of 1 give a density flat to 1e-9: treated as flat, where the shortest region is not unique.
  if (live.every((c) => Math.abs(c.a - 1) < 1e-9 && Math.abs(c.b - 1) < 1e-9)) {
    const lower = alpha / 2;
    const upper = 1 - alpha / 2;
    return {
      pieces: [{ lower, upper }],
      mass: level,
      note: "The posterior is flat (uniform), so no interval is shorter than another; the equal-tailed interval is shown.",
    };
  }

  // Fast paths for a single monotone Beta: the region starts at 0 (decreasing) or ends at 1 (increasing).
  if (live.length === 1) {
    const { a, b } = live[0];
    if (a <= 1 && b >= 1) return { pieces: [{ lower: 0, upper: betaQuantile(level, a, b) }], mass: level };
    if (a >= 1 && b <= 1) return { pieces: [{ lower: betaQuantile(alpha, a, b), upper: 1 }], mass: level };
  }

  const m = prepare(post);
  const grid = inspectionGrid(m);
  const dens = grid.map((p) => density(m, p));
  const finite = dens.filter((v) => Number.isFinite(v) && v > 0);
  // mass({f >= c}) decreases in c; bisect on log c.
  let logLo = Math.log(Math.min(...finite)) - 1;
  let logHi = Math.log(Math.max(...finite)) + 1;
  const regionMass = (pieces: Array<{ lower: number; upper: number }>) =>
    pieces.reduce((s, p) => s + massBetween(post, p.lower, p.upper), 0);
  let best = levelSet(m, grid, dens, Math.exp(logLo));
  let bestMass = regionMass(best);
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (logLo + logHi);
    const pieces = levelSet(m, grid, dens, Math.exp(mid));
    const mass = regionMass(pieces);
    if (mass >= level) {
      logLo = mid;
      best = pieces;
      bestMass = mass;
    } else logHi = mid;
    if (Math.abs(bestMass - level) < 1e-13 || logHi - logLo < 1e-15) break;
  }
  const uShaped = live.length === 1 && live[0].a < 1 && live[0].b < 1;
  let note: string | undefined;
  if (uShaped) note = "The posterior is U-shaped (both shape parameters below 1): the HPD region has two pieces, one at each end.";
  else if (best.length > 1) note = "The posterior is multimodal: the HPD region has more than one piece.";
  return { pieces: best, mass: bestMass, ...(note ? { note } : {}) };
}
