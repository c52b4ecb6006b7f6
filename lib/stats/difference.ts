/**
 * Two arms on the difference scale: P(pT - pC > delta) for independent mixture-of-Beta posteriors,
 * by numerical integration (never by sampling).
 *
 * For one pair of components, X ~ Beta(aT, bT) and Y ~ Beta(aC, bC):
 *   P(X - Y > delta) = [delta < 0] F_Y(-delta) + integral over y in (max(0, -delta), min(1, 1 - delta)) of f_Y(y) S_X(y + delta) dy
 *                    = [delta < 0] S_X(1 + delta) + integral over x in (max(0, delta), min(1, 1 + delta)) of f_X(x) F_Y(x - delta) dx.
 * The integral runs over the arm whose posterior is more concentrated, so the other arm's CDF is
 * smooth on the scale of the integrand. The range is cut to where that arm holds all but 1e-15 of
 * its mass (checked with the CDF, not assumed from a normal approximation), and an endpoint where
 * the integrand behaves like u^(alpha - 1) or 1 - c u^alpha with alpha < 1 (a shape parameter below
 * 1: U- or J-shaped posteriors, or delta near 0 with a small shape) is mapped by u = t^(1/alpha), which
 * makes the integrand bounded and smooth enough for Gauss–Kronrod. Adaptive Gauss–Kronrod 7/15
 * (QUADPACK's QAG scheme) then runs to an absolute error estimate of 1e-10 per pair.
 */
import type { MixtureBeta } from "./types";
import { betaCdfUnchecked, betaSurvivalUnchecked, logBetaUnchecked } from "./distributions";
import { requireMixture } from "./priors";
import { requireCount, requireFinite, StatsDomainError } from "./validate";

// Gauss–Kronrod 15-point nodes and weights with the embedded 7-point Gauss weights (QUADPACK qk15).
const XGK = [
  0.991455371120812639206854697526329, 0.949107912342758524526189684047851, 0.864864423359769072789712788640926,
  0.741531185599394439863864773280788, 0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
  0.207784955007898467600689403773245, 0,
];
const WGK = [
  0.02293532201052922496373200805897, 0.063092092629978553290700663189204, 0.104790010322250183839876322541518,
  0.140653259715525918745189590510238, 0.16900472663926790282658342659855, 0.190350578064785409913256402421014,
  0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
];
const WG = [
  0.129484966168869693270611432679082, 0.27970539148927666790146777142378, 0.381830050505118944950369775488975,
  0.417959183673469387755102040816327,
];
const EPMACH = 2.220446049250313e-16;

type Panel = { a: number; b: number; value: number; error: number };

function kronrod15(f: (t: number) => number, a: number, b: number): Panel {
  const c = 0.5 * (a + b);
  const h = 0.5 * (b - a);
  const fc = f(c);
  let resg = fc * WG[3];
  let resk = fc * WGK[7];
  let resabs = Math.abs(resk);
  const f1 = new Array<number>(7);
  const f2 = new Array<number>(7);
  for (let j = 0; j < 7; j++) {
    const dx = h * XGK[j];
    const u = f(c - dx);
    const v = f(c + dx);
    f1[j] = u;
    f2[j] = v;
    resk += WGK[j] * (u + v);
    resabs += WGK[j] * (Math.abs(u) + Math.abs(v));
    if (j & 1) resg += WG[j >> 1] * (u + v);
  }
  const reskh = resk * 0.5;
  let resasc = WGK[7] * Math.abs(fc - reskh);
  for (let j = 0; j < 7; j++) resasc += WGK[j] * (Math.abs(f1[j] - reskh) + Math.abs(f2[j] - reskh));
  const ah = Math.abs(h);
  resasc *= ah;
  resabs *= ah;
  let error = Math.abs((resk - resg) * h);
  if (resasc !== 0 && error !== 0) error = resasc * Math.min(1, Math.pow((200 * error) / resasc, 1.5));
  if (resabs > Number.MIN_VALUE / (50 * EPMACH)) error = Math.max(EPMACH * 50 * resabs, error);
  return { a, b, value: resk * h, error };
}

/**
 * Adaptive Gauss–Kronrod 7/15 integral of f over [a, b] (finite, a < b): bisects the panel with
 * the largest error estimate until the summed estimate is at most absTol (> 0) or maxPanels is
 * reached. Returns the value and the summed error estimate. f must be finite on (a, b).
 */
function integrateGaussKronrod(
  f: (t: number) => number,
  a: number,
  b: number,
  absTol: number,
  opts: { initialPanels?: number; maxPanels?: number } = {},
): { value: number; error: number } {
  const initial = opts.initialPanels ?? 2;
  const maxPanels = opts.maxPanels ?? 1000;
  const panels: Panel[] = [];
  for (let i = 0; i < initial; i++) panels.push(kronrod15(f, a + ((b - a) * i) / initial, a + ((b - a) * (i + 1)) / initial));
  let value = 0;
  let error = 0;
  for (const p of panels) {
    value += p.value;
    error += p.error;
  }
  while (error > absTol && panels.length < maxPanels) {
    let worst = 0;
    for (let i = 1; i < panels.length; i++) if (panels[i].error > panels[worst].error) worst = i;
    const p = panels[worst];
    const mid = 0.5 * (p.a + p.b);
    if (!(mid > p.a && mid < p.b)) break; // panel no longer divisible in floating point
    const left = kronrod15(f, p.a, mid);
    const right = kronrod15(f, mid, p.b);
    panels[worst] = left;
    panels.push(right);
    value = 0;
    error = 0;
    for (const q of panels) {
      value += q.value;
      error += q.error;
    }
  }
  return { value, error };
}

/** Mass each integration arm may leave outside the integration range. */
const TAIL_CUT = 1e-15;
/** Largest power used to flatten an endpoint singularity (shape parameters down to 1/60). */
const MAX_POWER = 60;
/** A singular point this close to the range (as a fraction of its length) is treated as at its end. */
const NEAR = 0.05;
/** Distances from the mean, in SDs, tried in turn as cut points. */
const CUT_SDS = [8, 10, 12, 16, 24, 32, 64, 128, 256, 1024];

/** n-point Gauss–Legendre nodes and weights on [-1, 1] (Newton on the Legendre recurrence). */
function gaussLegendre(n: number): { nodes: Float64Array; weights: Float64Array } {
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 1; i <= n; i++) {
    let z = Math.cos((Math.PI * (i - 0.25)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p1 = 1;
      let p2 = 0;
      for (let j = 1; j <= n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
      }
      dp = (n * (z * p1 - p2)) / (z * z - 1);
      const prev = z;
      z = prev - p1 / dp;
      if (Math.abs(z - prev) < 1e-16) break;
    }
    nodes[i - 1] = z;
    weights[i - 1] = 2 / ((1 - z * z) * dp * dp);
  }
  return { nodes, weights };
}
const { nodes: GL_NODES, weights: GL_WEIGHTS } = gaussLegendre(64);

/** Absolute error target for one pair of components (the mixture total stays well below 1e-8). */
const PAIR_ABS_TOL = 1e-10;

/**
 * P(X - Y > delta) for X ~ Beta(aT, bT), Y ~ Beta(aC, bC) independent; shapes > 0, delta in (-1, 1).
 * No validation (callers validate once). absTol > 0 is the adaptive rule's absolute error target;
 * forceAdaptive skips the fixed-order fast path (tests use it as the reference). `error` is the
 * adaptive rule's estimate, NaN when the fast path answered.
 * Exported for tests and for callers that loop over components themselves.
 */
export function pairProbDifferenceExceeds(
  aT: number,
  bT: number,
  aC: number,
  bC: number,
  delta: number,
  absTol: number = PAIR_ABS_TOL,
  forceAdaptive = false,
): { value: number; error: number } {
  const lbT = logBetaUnchecked(aT, bT);
  const lbC = logBetaUnchecked(aC, bC);
  const varT = (aT * bT) / ((aT + bT) * (aT + bT) * (aT + bT + 1));
  const varC = (aC * bC) / ((aC + bC) * (aC + bC) * (aC + bC + 1));

  // Integration arm Z ~ Beta(za, zb) with weight function g (a CDF or survival of the other arm);
  // [s, e] is where g is not constant. The other arm's boundaries sit at z = otherZero (power law
  // with exponent otherA there) and z = otherOne (exponent otherB).
  let za: number, zb: number, zlb: number;
  let constPart: number, s: number, e: number, otherZero: number, otherOne: number, otherA: number, otherB: number;
  let g: (z: number) => number;
  if (varC <= varT) {
    za = aC;
    zb = bC;
    zlb = lbC;
    constPart = delta < 0 ? betaCdfUnchecked(-delta, aC, bC, lbC) : 0;
    s = Math.max(0, -delta);
    e = Math.min(1, 1 - delta);
    otherZero = -delta;
    otherOne = 1 - delta;
    otherA = aT;
    otherB = bT;
    g = (y) => betaSurvivalUnchecked(y + delta, aT, bT, lbT);
  } else {
    za = aT;
    zb = bT;
    zlb = lbT;
    constPart = delta < 0 ? betaSurvivalUnchecked(1 + delta, aT, bT, lbT) : 0;
    s = Math.max(0, delta);
    e = Math.min(1, 1 + delta);
    otherZero = delta;
    otherOne = 1 + delta;
    otherA = aC;
    otherB = bC;
    g = (x) => betaCdfUnchecked(x - delta, aC, bC, lbC);
  }

  // Cut the range to the integration arm's effective support. kLo / kHi record how many SDs from
  // the mean each cut lies (Infinity when the range ends at s or e instead).
  const mean = za / (za + zb);
  const sd = Math.sqrt((za * zb) / ((za + zb) * (za + zb) * (za + zb + 1)));
  let lo = s;
  let hi = e;
  let kLo = Infinity;
  let kHi = Infinity;
  for (const k of CUT_SDS) {
    const t = mean + k * sd;
    if (t >= e) break;
    if (betaSurvivalUnchecked(t, za, zb, zlb) < TAIL_CUT) {
      hi = t;
      kHi = k;
      break;
    }
  }
  for (const k of CUT_SDS) {
    const t = mean - k * sd;
    if (t <= s) break;
    if (betaCdfUnchecked(t, za, zb, zlb) < TAIL_CUT) {
      lo = t;
      kLo = k;
      break;
    }
  }
  if (!(hi > lo)) return { value: constPart, error: 2 * TAIL_CUT };

  // Points where the integrand is a power law u^(alpha - 1) (Z's own ends) or 1 - c u^alpha (the
  // other arm's ends). Only those at or just outside the range (within NEAR of its length) matter.
  const len = hi - lo;
  const near = NEAR * len;
  const singular: Array<[number, number]> = [
    [0, za],
    [1, zb],
    [otherZero, otherA],
    [otherOne, otherB],
  ];
  const regular = (alpha: number) => Number.isInteger(alpha) || alpha >= 6;
  let loRegular = true;
  let hiRegular = true;
  // Each end is mapped from the nearby singular point needing the largest power (qL / qR with power
  // pL / pR), so the power laws there become t^(p * alpha - 1) with p * alpha >= 1.
  let pL = 1;
  let pR = 1;
  let qL = lo;
  let qR = hi;
  for (const [q, alpha] of singular) {
    if (regular(alpha)) continue;
    // u = t^p with p = ceil(alpha) / alpha turns u^alpha into the integer power t^ceil(alpha).
    const p = Math.min(Math.ceil(alpha) / alpha, MAX_POWER);
    if (q <= lo && lo - q <= near) {
      loRegular = false;
      if (p > pL) {
        pL = p;
        qL = q;
      }
    }
    if (q >= hi && q - hi <= near) {
      hiRegular = false;
      if (p > pR) {
        pR = p;
        qR = q;
      }
    }
  }

  // Fast path: when the integrand is analytic near [lo, hi] and the range is at most 12 SDs from the
  // mean on each side, 64-point Gauss–Legendre is accurate to about 1e-13 (difference.test.ts
  // compares it with the adaptive rule over random shapes). An end qualifies when it is a tail cut,
  // or when every power law at or near it has an integer exponent or one of at least 6.
  if (!forceAdaptive) {
    const loOk = kLo <= 12 || (mean - 12 * sd <= lo && loRegular);
    const hiOk = kHi <= 12 || (mean + 12 * sd >= hi && hiRegular);
    if (loOk && hiOk) {
      const half = 0.5 * len;
      const mid = 0.5 * (hi + lo);
      let sum = 0;
      for (let i = 0; i < GL_NODES.length; i++) {
        const z = mid + half * GL_NODES[i];
        sum += GL_WEIGHTS[i] * Math.exp((za - 1) * Math.log(z) + (zb - 1) * Math.log1p(-z) - zlb) * g(z);
      }
      return { value: Math.min(1, Math.max(0, constPart + sum * half)), error: NaN };
    }
  }

  // The density takes 1 - z separately: near z = 1 with zb < 1 the mass within one rounding unit
  // of 1 is about 1e-16^zb (4e-7 for zb = 0.4), so 1 - z must not be formed by subtraction there.
  const h = (z: number, oneMinusZ: number) => {
    if (!(z > 0) || !(oneMinusZ > 0)) return 0;
    const v = Math.exp((za - 1) * Math.log(z) + (zb - 1) * Math.log(oneMinusZ) - zlb) * g(z);
    return Number.isFinite(v) ? v : 0;
  };
  // z = anchor + dir * span * t^p for t in [tStart, 1], tStart chosen so the piece starts at `from`.
  const mapped = (anchor: number, dir: number, span: number, p: number) => (t: number) => {
    const tp1 = p === 1 ? 1 : Math.pow(t, p - 1);
    const jac = p * span * tp1;
    if (jac === 0) return 0;
    const w = span * tp1 * t;
    return dir > 0 ? h(anchor + w, 1 - (anchor + w)) * jac : h(anchor - w, 1 - anchor + w) * jac;
  };

  let value = constPart;
  let error = 2 * TAIL_CUT;
  const run = (anchor: number, dir: number, from: number, to: number, p: number, tol: number) => {
    const span = Math.abs(to - anchor);
    const tStart = Math.pow(Math.abs(from - anchor) / span, 1 / p);
    if (!(tStart < 1)) return;
    const r = integrateGaussKronrod(mapped(anchor, dir, span, p), tStart, 1, tol);
    value += r.value;
    error += r.error;
  };
  if (pL > 1 && pR > 1) {
    const mid = 0.5 * (lo + hi);
    run(qL, 1, lo, mid, pL, absTol / 2);
    run(qR, -1, hi, mid, pR, absTol / 2);
  } else if (pR > 1) {
    run(qR, -1, hi, lo, pR, absTol);
  } else {
    run(qL, 1, lo, hi, pL, absTol);
  }
  return { value: Math.min(1, Math.max(0, value)), error };
}

/**
 * P(pT - pC > delta | data) for independent posteriors pT ~ postT and pC ~ postC.
 * @param postT experimental arm's posterior: a mixture of Beta components (weights in [0, 1] summing to 1, shapes > 0)
 * @param postC control arm's posterior, same form
 * @param delta margin on the difference scale, in the open interval (-1, 1); negative for non-inferiority
 * @returns a probability in [0, 1], accurate to about 1e-10 (absolute)
 * @example probDifferenceExceeds([{ weight: 1, a: 1, b: 1 }], [{ weight: 1, a: 1, b: 1 }], 0) // 0.5
 */
export function probDifferenceExceeds(postT: MixtureBeta, postC: MixtureBeta, delta: number): number {
  requireMixture("postT", postT);
  requireMixture("postC", postC);
  requireFinite("delta", delta);
  if (!(delta > -1 && delta < 1)) throw new StatsDomainError("delta", delta, "must lie strictly between -1 and 1");
  let total = 0;
  for (const t of postT) {
    if (t.weight === 0) continue;
    for (const c of postC) {
      if (c.weight === 0) continue;
      total += t.weight * c.weight * pairProbDifferenceExceeds(t.a, t.b, c.a, c.b, delta).value;
    }
  }
  return Math.min(1, Math.max(0, total));
}

/** P(D > d) for D = pT - pC at any real d (1 below -1, 0 above 1); inputs already validated. */
function exceedsAnywhere(postT: MixtureBeta, postC: MixtureBeta, d: number): number {
  if (d <= -1) return 1;
  if (d >= 1) return 0;
  return probDifferenceExceeds(postT, postC, d);
}

/**
 * The density of D = pT - pC on `points` equally spaced values from -1 to 1, for plotting.
 * Each value is the mean density over the cell of width 2 / (points - 1) centred on the grid
 * value (cell mass / cell width, cells clipped to [-1, 1]), computed from P(D > edge): it is finite
 * even where the pointwise density is infinite, and the cell masses sum to 1. For cells narrow
 * against the posterior spread it equals the pointwise density to O(width^2).
 * @param postT experimental arm's posterior mixture (as in probDifferenceExceeds)
 * @param postC control arm's posterior mixture
 * @param points number of grid values, an integer from 2 to 100000
 * @returns d (the grid) and density (same length)
 */
export function differenceDensityGrid(
  postT: MixtureBeta,
  postC: MixtureBeta,
  points: number,
): { d: number[]; density: number[] } {
  requireMixture("postT", postT);
  requireMixture("postC", postC);
  requireCount("points", points);
  if (points < 2 || points > 100_000) throw new StatsDomainError("points", points, "must be an integer from 2 to 100000");
  const step = 2 / (points - 1);
  const d: number[] = [];
  const edges: number[] = [];
  for (let i = 0; i < points; i++) d.push(i === points - 1 ? 1 : -1 + i * step);
  for (let j = 0; j <= points; j++) edges.push(Math.min(1, Math.max(-1, -1 + (j - 0.5) * step)));
  const above = edges.map((x) => exceedsAnywhere(postT, postC, x));
  const density = d.map((_, i) => {
    const width = edges[i + 1] - edges[i];
    return Math.max(0, above[i] - above[i + 1]) / width;
  });
  return { d, density };
}
