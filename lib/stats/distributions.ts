/**
 * Distribution primitives for the Beta-binomial model.
 *
 * Invalid-input contract for all of lib/stats: a function given an argument outside its stated
 * domain throws a `StatsDomainError` naming the argument and the rule it breaks. It never returns
 * NaN silently. (Callers at the HTTP edge validate with zod first; this is the last line.)
 *
 * The incomplete beta and log-gamma are implemented here rather than taken from jstat 1.9.6: jstat's
 * incomplete-beta continued fraction stops at a relative change of 3e-7 (and after 100 terms), and
 * its log-gamma is a 6-term Lanczos series good to about 2e-10, both too coarse for the 1e-8
 * accuracy the two-arm and predictive computations need. jstat is used where that accuracy is
 * enough: its inverse incomplete beta (`ibetainv`) is the starting point of `betaQuantile`, which
 * then polishes it with Newton steps on the accurate CDF below (so the result carries this file's
 * accuracy, not jstat's). Accuracy is checked against stdlib-js fixtures (lib/stats/__fixtures__)
 * in distributions.test.ts, and betaCdf against jstat's own ibeta there as a cross-library check.
 *
 * Functions whose names end in `Unchecked` skip argument validation; they exist for inner loops
 * (quadrature nodes, operating-characteristic recursions) whose callers have validated once.
 */
import jstat from "jstat";
import { requireFinite, requirePositive, requireProbability, requireCount, StatsDomainError } from "./validate";

const { jStat } = jstat;

const LN_SQRT_2PI = 0.918938533204672741780329736406; // ln(sqrt(2 pi))

// Lanczos approximation, g = 7, n = 9: relative error of Gamma about 1e-15 for x >= 1.
const LANCZOS_G = 7;
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/**
 * Stirling-series remainder ln Gamma(x) - [(x - 1/2) ln x - x + ln sqrt(2 pi)] for x >= 10.
 * Terms B_2k / (2k (2k - 1) x^(2k-1)); the 8th term at x = 10 is below 1e-15.
 */
function lgammaCorrection(x: number): number {
  const r = 1 / (x * x);
  return (
    (1 / x) *
    (1 / 12 +
      r *
        (-1 / 360 +
          r * (1 / 1260 + r * (-1 / 1680 + r * (1 / 1188 + r * (-691 / 360360 + r * (1 / 156 + r * (-3617 / 122400))))))))
  );
}

/** ln Gamma(x) for x > 0 (no validation). */
export function logGammaUnchecked(x: number): number {
  if (x < 1) return logGammaUnchecked(x + 1) - Math.log(x);
  if (x >= 10) return (x - 0.5) * Math.log(x) - x + LN_SQRT_2PI + lgammaCorrection(x);
  const z = x - 1;
  let s = LANCZOS[0];
  for (let i = 1; i < 9; i++) s += LANCZOS[i] / (z + i);
  const t = z + LANCZOS_G + 0.5;
  return LN_SQRT_2PI + (z + 0.5) * Math.log(t) - t + Math.log(s);
}

/**
 * ln B(a, b) for a, b > 0 (no validation). For large arguments the Stirling terms are combined
 * before exponent-sized quantities can cancel (the arrangement used by R's lbeta).
 */
export function logBetaUnchecked(a: number, b: number): number {
  const p = Math.min(a, b);
  const q = Math.max(a, b);
  if (p >= 10) {
    const corr = lgammaCorrection(p) + lgammaCorrection(q) - lgammaCorrection(p + q);
    return -0.5 * Math.log(q) + LN_SQRT_2PI + corr + (p - 0.5) * Math.log(p / (p + q)) + q * Math.log1p(-p / (p + q));
  }
  if (q >= 10) {
    const corr = lgammaCorrection(q) - lgammaCorrection(p + q);
    return logGammaUnchecked(p) + corr + p - p * Math.log(p + q) + (q - 0.5) * Math.log1p(-p / (p + q));
  }
  return logGammaUnchecked(p) + logGammaUnchecked(q) - logGammaUnchecked(p + q);
}

const CF_TINY = 1e-300;
const CF_EPS = 1e-16;
const CF_MAX_TERMS = 100_000;

/** Continued fraction for the incomplete beta (modified Lentz), valid for x < (a + 1) / (a + b + 2). */
function betaContinuedFraction(x: number, a: number, b: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < CF_TINY) d = CF_TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= CF_MAX_TERMS; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < CF_EPS) return h;
  }
  // Only reachable for shapes far beyond any trial (millions); say so rather than return a guess.
  throw new StatsDomainError("a, b", `${a}, ${b}`, "are too large for the incomplete beta continued fraction");
}

/**
 * Regularized incomplete beta on the side that is computed directly: returns I_x(a, b) when
 * `upper` is false and 1 - I_x(a, b) when true, each without cancellation where it is small.
 * x in (0, 1), a, b > 0, lbeta = ln B(a, b). No validation.
 */
function incompleteBeta(x: number, a: number, b: number, lbeta: number, upper: boolean): number {
  const front = Math.exp(a * Math.log(x) + b * Math.log1p(-x) - lbeta);
  if (x < (a + 1) / (a + b + 2)) {
    const lower = (front * betaContinuedFraction(x, a, b)) / a;
    return upper ? 1 - lower : lower;
  }
  const up = (front * betaContinuedFraction(1 - x, b, a)) / b;
  return upper ? up : 1 - up;
}

/** P(X <= p), X ~ Beta(a, b), with lbeta = ln B(a, b) precomputed; no validation. */
export function betaCdfUnchecked(p: number, a: number, b: number, lbeta: number): number {
  if (p <= 0) return 0;
  if (p >= 1) return 1;
  return incompleteBeta(p, a, b, lbeta, false);
}

/** P(X > p), X ~ Beta(a, b), with lbeta = ln B(a, b) precomputed; no validation. */
export function betaSurvivalUnchecked(p: number, a: number, b: number, lbeta: number): number {
  if (p <= 0) return 1;
  if (p >= 1) return 0;
  return incompleteBeta(p, a, b, lbeta, true);
}

/** Beta(a, b) density at p, with lbeta = ln B(a, b) precomputed; no validation. */
export function betaPdfUnchecked(p: number, a: number, b: number, lbeta: number): number {
  if (p < 0 || p > 1) return 0;
  if (p === 0) return a < 1 ? Infinity : a === 1 ? Math.exp(-lbeta) : 0;
  if (p === 1) return b < 1 ? Infinity : b === 1 ? Math.exp(-lbeta) : 0;
  return Math.exp((a - 1) * Math.log(p) + (b - 1) * Math.log1p(-p) - lbeta);
}

/** ln B(a, b) for a, b > 0. */
export function logBeta(a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  return logBetaUnchecked(a, b);
}

/** ln C(n, k) for integers 0 <= k <= n. */
export function logChoose(n: number, k: number): number {
  requireCount("n", n);
  requireCount("k", k);
  if (k > n) throw new StatsDomainError("k", k, "must not exceed n");
  if (k === 0 || k === n) return 0;
  // C(n, k) = 1 / ((n + 1) B(k + 1, n - k + 1)); logBeta keeps large n accurate.
  return -Math.log(n + 1) - logBetaUnchecked(k + 1, n - k + 1);
}

/** Beta(a, b) density at p (finite). 0 outside [0, 1]; infinite at an endpoint where the shape parameter is below 1. */
export function betaPdf(p: number, a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  requireFinite("p", p);
  return betaPdfUnchecked(p, a, b, logBetaUnchecked(a, b));
}

/** P(X <= p) for X ~ Beta(a, b); a, b > 0, p finite (0 below 0, 1 above 1). */
export function betaCdf(p: number, a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  requireFinite("p", p);
  return betaCdfUnchecked(p, a, b, logBetaUnchecked(a, b));
}

/** P(X > p) for X ~ Beta(a, b), computed without cancellation in the upper tail; a, b > 0, p finite. */
export function betaSurvival(p: number, a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  requireFinite("p", p);
  return betaSurvivalUnchecked(p, a, b, logBetaUnchecked(a, b));
}

/**
 * Starting value for the Beta quantile: jstat's `ibetainv` (the classic normal / power-tail
 * approximation refined by up to ten Halley steps on jstat's own incomplete beta, so good to about
 * its 3e-7). Near-correct starts save most of our Newton steps, each of which costs an accurate
 * (and slower) continued fraction. jstat returns 0, 1 or NaN for some extreme shapes and tails;
 * then the plain approximation is the start and the safeguarded Newton does the rest.
 */
function betaQuantileStart(q: number, a: number, b: number): number {
  const x = jStat.ibetainv(q, a, b) as number;
  if (x > 0 && x < 1) return x;
  return betaQuantileGuess(q, a, b);
}

/** The classic normal / power-tail approximations to the Beta quantile (the start jstat refines). */
function betaQuantileGuess(q: number, a: number, b: number): number {
  if (a >= 1 && b >= 1) {
    const pp = q < 0.5 ? q : 1 - q;
    const t = Math.sqrt(-2 * Math.log(pp));
    let z = (2.30753 + t * 0.27061) / (1 + t * (0.99229 + t * 0.04481)) - t;
    if (q < 0.5) z = -z;
    const al = (z * z - 3) / 6;
    const h = 2 / (1 / (2 * a - 1) + 1 / (2 * b - 1));
    const w = (z * Math.sqrt(al + h)) / h - (1 / (2 * b - 1) - 1 / (2 * a - 1)) * (al + 5 / 6 - 2 / (3 * h));
    return a / (a + b * Math.exp(2 * w));
  }
  const lna = Math.log(a / (a + b));
  const lnb = Math.log(b / (a + b));
  const t = Math.exp(a * lna) / a;
  const u = Math.exp(b * lnb) / b;
  const w = t + u;
  if (q < t / w) return Math.pow(a * w * q, 1 / a);
  return 1 - Math.pow(b * w * (1 - q), 1 / b);
}

/**
 * Quantile of Beta(a, b) at probability q in [0, 1]; a, b > 0. Returns 0 at q = 0 and 1 at q = 1.
 * Safeguarded Newton: each step keeps a bracket and falls back to (geometric) bisection, and the
 * equation is posed on the tail that holds q (F(x) = q for q <= 1/2, S(x) = 1 - q above) so that
 * the residual is computed without cancellation.
 */
export function betaQuantile(q: number, a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  requireProbability("q", q, { closed: true });
  if (q === 0) return 0;
  if (q === 1) return 1;
  return betaQuantileUnchecked(q, a, b, logBetaUnchecked(a, b));
}

/** betaQuantile without validation; q in (0, 1), lbeta = ln B(a, b). */
export function betaQuantileUnchecked(q: number, a: number, b: number, lbeta: number): number {
  const lowerTail = q <= 0.5;
  const target = lowerTail ? q : 1 - q;
  let lo = 0;
  let hi = 1;
  let x = betaQuantileStart(q, a, b);
  if (!(x > 0 && x < 1)) x = 0.5;
  for (let iter = 0; iter < 400; iter++) {
    // r(x) is increasing in x and zero at the quantile.
    const r = lowerTail ? betaCdfUnchecked(x, a, b, lbeta) - target : target - betaSurvivalUnchecked(x, a, b, lbeta);
    if (r === 0) return x;
    if (r < 0) lo = x;
    else hi = x;
    const d = betaPdfUnchecked(x, a, b, lbeta);
    let next = x - r / d;
    if (!(next > lo && next < hi) || !Number.isFinite(next)) {
      if (lo === 0) next = hi * 0.05;
      else if (hi / lo > 4) next = Math.sqrt(lo * hi);
      else next = 0.5 * (lo + hi);
    }
    if (Math.abs(next - x) <= 2e-16 * Math.max(next, 1e-300) || hi - lo <= 4e-16 * hi) return next;
    x = next;
  }
  return x;
}

/** ln P(Y = k) for Y ~ BetaBinomial(m, a, b); m, k non-negative integers, a, b > 0; -Infinity when k > m. */
export function logBetaBinomialPmf(k: number, m: number, a: number, b: number): number {
  requireCount("m", m);
  requireCount("k", k);
  requirePositive("a", a);
  requirePositive("b", b);
  if (k > m) return -Infinity;
  return logChoose(m, k) + logBetaUnchecked(a + k, b + m - k) - logBetaUnchecked(a, b);
}

/** The whole BetaBinomial(m, a, b) mass function as an array of length m + 1 (sums to 1); m a non-negative integer, a, b > 0. */
export function betaBinomialPmfs(m: number, a: number, b: number): Float64Array {
  requireCount("m", m);
  requirePositive("a", a);
  requirePositive("b", b);
  const out = new Float64Array(m + 1);
  // Recurrence P(k+1)/P(k) = (m-k)(a+k) / ((k+1)(b+m-k-1)), started from the log of P(0);
  // then renormalised so rounding cannot push the total away from 1.
  out[0] = Math.exp(logBetaUnchecked(a, b + m) - logBetaUnchecked(a, b));
  let total = out[0];
  for (let k = 0; k < m; k++) {
    out[k + 1] = (out[k] * (m - k) * (a + k)) / ((k + 1) * (b + m - k - 1));
    total += out[k + 1];
  }
  if (!(total > 0) || !Number.isFinite(total) || out[0] < 1e-280) {
    // P(0) underflows (or nearly) for extreme shapes: use the log form term by term.
    total = 0;
    for (let k = 0; k <= m; k++) {
      out[k] = Math.exp(logBetaBinomialPmf(k, m, a, b));
      total += out[k];
    }
  }
  for (let k = 0; k <= m; k++) out[k] /= total;
  return out;
}

/** The whole Binomial(m, p) mass function, length m + 1; m a non-negative integer, p in [0, 1]. */
export function binomialPmfs(m: number, p: number): Float64Array {
  requireCount("m", m);
  requireProbability("p", p, { closed: true });
  const out = new Float64Array(m + 1);
  if (p === 0) {
    out[0] = 1;
    return out;
  }
  if (p === 1) {
    out[m] = 1;
    return out;
  }
  const lp = Math.log(p);
  const lq = Math.log1p(-p);
  for (let k = 0; k <= m; k++) out[k] = Math.exp(logChoose(m, k) + k * lp + (m - k) * lq);
  return out;
}
