/**
 * Highest posterior density (HPD) regions for a rate whose posterior is a mixture of Betas:
 * the shortest region holding a given mass, i.e. {p : f(p) >= c} with c chosen so the region holds
 * the mass. It is one interval for a unimodal posterior, an interval starting at 0 or ending at 1
 * for a monotone (J-shaped) one, two pieces [0, l] and [u, 1] for a U-shaped one (both shape
 * parameters below 1), and possibly several pieces for a multimodal mixture. A flat posterior
 * (Beta(1, 1)) has no unique HPD region; the equal-tailed interval is returned with a note.
 * A single Beta (the usual posterior) is solved directly: closed form when monotone, one Newton
 * equation otherwise (singleBetaHpd); only mixtures need the general level-set search.
 */
import type { MixtureBeta } from "./types";
import {
  betaCdfUnchecked,
  betaPdfUnchecked,
  betaQuantile,
  betaQuantileUnchecked,
  betaSurvivalUnchecked,
  logBetaUnchecked,
} from "./distributions";
import { mixtureCdf, mixtureSurvival, requireMixture } from "./priors";
import { requireProbability } from "./validate";

export type CredibleRegion = {
  /** Disjoint intervals in increasing order. */
  pieces: Array<{ lower: number; upper: number }>;
  /** Posterior mass of the region (equals the level to about 1e-12; 1e-11 for extreme shapes). */
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

const EPS = 2.220446049250313e-16;
const FLAT_NOTE = "The posterior is flat (uniform), so no interval is shorter than another; the equal-tailed interval is shown.";
const U_NOTE = "The posterior is U-shaped (both shape parameters below 1): the HPD region has two pieces, one at each end.";
const MULTIMODAL_NOTE = "The posterior is multimodal: the HPD region has more than one piece.";

/** ln of the Beta(a, b) density up to its constant. */
function logKernel(p: number, a: number, b: number): number {
  return (a - 1) * Math.log(p) + (b - 1) * Math.log1p(-p);
}

/** d/dp of logKernel. */
function logKernelSlope(p: number, a: number, b: number): number {
  return (a - 1) / p - (b - 1) / (1 - p);
}

/**
 * The point u in (turn, 1) where the density equals its value at l in (0, turn), turn being the
 * mode (a, b > 1) or the antimode (a, b < 1). The log density is monotone on (turn, 1) and concave
 * (mode) or convex (antimode) there, so a bracketed Newton step converges in a handful of steps.
 */
function matchingUpper(l: number, a: number, b: number, turn: number, guess: number): number {
  const target = logKernel(l, a, b);
  const sign = a > 1 ? 1 : -1; // sign * (logKernel(u) - target) decreases on (turn, 1)
  let lo = turn;
  let hi = 1;
  let u = guess > turn && guess < 1 ? guess : 0.5 * (turn + 1);
  for (let i = 0; i < 200; i++) {
    const g = sign * (logKernel(u, a, b) - target);
    if (g === 0) return u;
    if (g > 0) lo = u;
    else hi = u;
    let next = u - g / (sign * logKernelSlope(u, a, b));
    if (!(next > lo && next < hi) || !Number.isFinite(next)) next = 0.5 * (lo + hi);
    if (Math.abs(next - u) <= 2e-16 * next || hi - lo <= 2e-16) return next;
    u = next;
  }
  return u;
}

/**
 * HPD region of one Beta(a, b) with both shapes above 1 (one interval [l, u]) or both below 1 (two
 * pieces [0, l] and [u, 1]). Both cases reduce to one equation in l: u = u(l) has the same density
 * as l, and the tail mass outside the region, F(l) + S(u(l)), must equal 1 - level (interval) or
 * level (two pieces). That tail mass rises with l, and its derivative is
 * f(l) (1 - phi'(l) / phi'(u)) with phi the log density, so Newton's method on l converges
 * quadratically from the equal-tailed start. Each step costs two incomplete-beta evaluations, where
 * the level-set search needs hundreds. Returns null if it fails to converge (the caller then uses
 * the general level-set search); hpd.test.ts checks that it converges and agrees with that search.
 * No validation: a, b both above 1 or both below 1, lbeta = ln B(a, b).
 */
export function singleBetaHpd(
  a: number,
  b: number,
  level: number,
  lbeta: number,
  start?: { lower: number; upper: number },
): CredibleRegion | null {
  const unimodal = a > 1;
  const turn = (a - 1) / (a + b - 2);
  const target = unimodal ? 1 - level : level;
  let lo = 0;
  let hi = turn;
  let l = start?.lower ?? betaQuantileUnchecked(target / 2, a, b, lbeta);
  let u = start?.upper ?? betaQuantileUnchecked(1 - target / 2, a, b, lbeta);
  if (!(l > 0 && l < turn)) l = 0.5 * turn;
  for (let iter = 0; iter < 200; iter++) {
    u = matchingUpper(l, a, b, turn, u);
    const tails = betaCdfUnchecked(l, a, b, lbeta) + betaSurvivalUnchecked(u, a, b, lbeta);
    const r = tails - target;
    const fl = betaPdfUnchecked(l, a, b, lbeta);
    // Rounding floor of r: one unit in the last place of l or u moves the tails by about f * ulp.
    const floor = 1e-15 * target + 8 * EPS * (fl * l + (u < 1 ? betaPdfUnchecked(u, a, b, lbeta) * u : 0));
    if (Math.abs(r) <= floor) return singleBetaRegion(l, u, unimodal, tails);
    if (r < 0) lo = l;
    else hi = l;
    const slope = fl * (1 - logKernelSlope(l, a, b) / logKernelSlope(u, a, b));
    let next = l - r / slope;
    if (!(next > lo && next < hi) || !Number.isFinite(next))
      // Bisection fallback; geometric (squaring towards 0) because a shape just above or below 1
      // can put l at 1e-100 or below.
      next = lo === 0 ? Math.min(0.05 * hi, Math.max(hi * hi, 1e-300)) : hi / lo > 16 ? Math.sqrt(lo * hi) : 0.5 * (lo + hi);
    if (Math.abs(next - l) <= 2e-16 * next || hi - lo <= 4e-16 * hi) {
      u = matchingUpper(next, a, b, turn, u);
      const t = betaCdfUnchecked(next, a, b, lbeta) + betaSurvivalUnchecked(u, a, b, lbeta);
      return Math.abs(t - target) <= Math.max(1e-12, 2 * floor) ? singleBetaRegion(next, u, unimodal, t) : null;
    }
    if (!(next > 0)) return null; // below 1e-300: leave it to the level-set search
    l = next;
  }
  return null;
}

function singleBetaRegion(l: number, u: number, unimodal: boolean, tails: number): CredibleRegion {
  // A mode within rounding of 1 puts the matching point past the last double below 1, where no
  // representable u has the density of l: the end is 1 then, as the level-set search reports it.
  if (u > 1 - 5e-16) u = 1;
  if (unimodal) return { pieces: [{ lower: l, upper: u }], mass: 1 - tails };
  return {
    pieces: [
      { lower: 0, upper: l },
      { lower: u, upper: 1 },
    ],
    mass: tails,
    note: U_NOTE,
  };
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
  return hpdRegionUnchecked(post, level);
}

/**
 * hpdRegion without validation, for callers that have validated the posterior and level.
 * `equalTailed`, when the caller already has the (1 -/+ level) / 2 quantiles of a single Beta,
 * warm-starts the single-Beta solver.
 */
export function hpdRegionUnchecked(post: MixtureBeta, level: number, equalTailed?: { lower: number; upper: number }): CredibleRegion {
  const live = post.filter((c) => c.weight > 0);
  const alpha = 1 - level;

  // Shapes within 1e-9 of 1 give a density flat to 1e-9: treated as flat, where the shortest region is not unique.
  if (live.every((c) => Math.abs(c.a - 1) < 1e-9 && Math.abs(c.b - 1) < 1e-9))
    return { pieces: [{ lower: alpha / 2, upper: 1 - alpha / 2 }], mass: level, note: FLAT_NOTE };

  if (live.length === 1) {
    const { a, b } = live[0];
    // Monotone (J-shaped): the region starts at 0 (decreasing density) or ends at 1 (increasing).
    if (a <= 1 && b >= 1) return { pieces: [{ lower: 0, upper: betaQuantile(level, a, b) }], mass: level };
    if (a >= 1 && b <= 1) return { pieces: [{ lower: betaQuantile(alpha, a, b), upper: 1 }], mass: level };
    // Unimodal with an interior mode, or U-shaped: one equation in the lower end.
    const warm = a > 1 ? equalTailed : undefined;
    const fast = singleBetaHpd(a, b, level, logBetaUnchecked(a, b), warm);
    if (fast) return fast;
  }
  return hpdRegionByLevelSet(post, level);
}

/**
 * The general search: bisection on the density level c until {f >= c} holds the mass. Works for
 * any mixture; exported so tests can compare the single-Beta solver with it.
 */
export function hpdRegionByLevelSet(post: MixtureBeta, level: number): CredibleRegion {
  const live = post.filter((c) => c.weight > 0);
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
  if (uShaped) note = U_NOTE;
  else if (best.length > 1) note = MULTIMODAL_NOTE;
  return { pieces: best, mass: bestMass, ...(note ? { note } : {}) };
}
