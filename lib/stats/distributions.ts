/**
 * Distribution primitives for the Beta-binomial model, on top of jstat.
 *
 * Invalid-input contract for all of lib/stats: a function given an argument outside its stated
 * domain throws a `StatsDomainError` naming the argument and the rule it breaks. It never returns
 * NaN silently. (Callers at the HTTP edge validate with zod first; this is the last line.)
 */
import jstatModule from "jstat";
import { requireFinite, requirePositive, requireProbability, requireCount, StatsDomainError } from "./validate";

// jstat's CommonJS export is the jStat function itself.
const jStat: any = (jstatModule as any).jStat ?? jstatModule;

/** ln B(a, b) for a, b > 0. */
export function logBeta(a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  return jStat.betaln(a, b);
}

/** ln C(n, k) for integers 0 <= k <= n. */
export function logChoose(n: number, k: number): number {
  requireCount("n", n);
  requireCount("k", k);
  if (k > n) throw new StatsDomainError("k", k, "must not exceed n");
  return jStat.gammaln(n + 1) - jStat.gammaln(k + 1) - jStat.gammaln(n - k + 1);
}

/** Beta(a, b) density at p in [0, 1]. Infinite at an endpoint where the shape parameter is below 1. */
export function betaPdf(p: number, a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  requireFinite("p", p);
  if (p < 0 || p > 1) return 0;
  if (p === 0) return a < 1 ? Infinity : a === 1 ? 1 / Math.exp(jStat.betaln(a, b)) : 0;
  if (p === 1) return b < 1 ? Infinity : b === 1 ? 1 / Math.exp(jStat.betaln(a, b)) : 0;
  return Math.exp((a - 1) * Math.log(p) + (b - 1) * Math.log1p(-p) - jStat.betaln(a, b));
}

/** P(X <= p) for X ~ Beta(a, b). */
export function betaCdf(p: number, a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  requireFinite("p", p);
  if (p <= 0) return 0;
  if (p >= 1) return 1;
  // The regularized incomplete beta loses relative accuracy in the far upper tail; use the
  // reflection I_p(a,b) = 1 - I_{1-p}(b,a) on whichever side keeps the small number small.
  if (p > a / (a + b)) return 1 - jStat.ibeta(1 - p, b, a);
  return jStat.ibeta(p, a, b);
}

/** P(X > p) for X ~ Beta(a, b), computed without cancellation in the upper tail. */
export function betaSurvival(p: number, a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  requireFinite("p", p);
  if (p <= 0) return 1;
  if (p >= 1) return 0;
  if (p > a / (a + b)) return jStat.ibeta(1 - p, b, a);
  return 1 - jStat.ibeta(p, a, b);
}

/** Quantile of Beta(a, b) at probability q in [0, 1]. */
export function betaQuantile(q: number, a: number, b: number): number {
  requirePositive("a", a);
  requirePositive("b", b);
  requireProbability("q", q, { closed: true });
  if (q === 0) return 0;
  if (q === 1) return 1;
  let x: number = jStat.ibetainv(q, a, b);
  // A few Newton steps on the log scale tighten jstat's inverse for extreme shapes.
  for (let i = 0; i < 4; i++) {
    const f = betaCdf(x, a, b) - q;
    const d = betaPdf(x, a, b);
    if (!Number.isFinite(d) || d <= 0) break;
    const next = x - f / d;
    if (!(next > 0 && next < 1)) break;
    if (Math.abs(next - x) < 1e-15 * Math.max(x, 1e-300)) {
      x = next;
      break;
    }
    x = next;
  }
  return x;
}

/** ln P(Y = k) for Y ~ BetaBinomial(m, a, b). */
export function logBetaBinomialPmf(k: number, m: number, a: number, b: number): number {
  requireCount("m", m);
  requireCount("k", k);
  requirePositive("a", a);
  requirePositive("b", b);
  if (k > m) return -Infinity;
  return logChoose(m, k) + jStat.betaln(a + k, b + m - k) - jStat.betaln(a, b);
}

/** The whole BetaBinomial(m, a, b) mass function as an array of length m + 1 (sums to 1). */
export function betaBinomialPmfs(m: number, a: number, b: number): Float64Array {
  requireCount("m", m);
  requirePositive("a", a);
  requirePositive("b", b);
  const out = new Float64Array(m + 1);
  // Recurrence P(k+1)/P(k) = (m-k)(a+k) / ((k+1)(b+m-k-1)), started from the log of P(0);
  // then renormalised so rounding cannot push the total away from 1.
  out[0] = Math.exp(jStat.betaln(a, b + m) - jStat.betaln(a, b));
  let total = out[0];
  for (let k = 0; k < m; k++) {
    out[k + 1] = (out[k] * (m - k) * (a + k)) / ((k + 1) * (b + m - k - 1));
    total += out[k + 1];
  }
  if (!(total > 0) || !Number.isFinite(total) || out[0] === 0) {
    // Underflow of P(0) for extreme shapes: fall back to the log form term by term.
    total = 0;
    for (let k = 0; k <= m; k++) {
      out[k] = Math.exp(logBetaBinomialPmf(k, m, a, b));
      total += out[k];
    }
  }
  for (let k = 0; k <= m; k++) out[k] /= total;
  return out;
}

/** The whole Binomial(m, p) mass function, length m + 1. */
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
