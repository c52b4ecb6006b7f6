/**
 * Frequentist confidence intervals for a binomial proportion, shown beside the Bayesian ones:
 * Clopper & Pearson (1934) exact interval and the Wilson score interval (Brown, Cai & DasGupta 2001).
 */
import { betaQuantile, logGammaUnchecked } from "./distributions";
import { requireData, requireProbability, StatsDomainError } from "./validate";

function requireTrials(x: number, n: number): void {
  requireData(x, n);
  if (n < 1) throw new StatsDomainError("n", n, "must be at least 1 for a confidence interval");
}

/**
 * Clopper–Pearson interval: lower = Beta quantile alpha/2 with shapes (x, n - x + 1), 0 when x = 0;
 * upper = Beta quantile 1 - alpha/2 with shapes (x + 1, n - x), 1 when x = n.
 * @param x responders, integer, 0 <= x <= n
 * @param n patients, integer >= 1
 * @param level confidence level strictly between 0 and 1 (e.g. 0.95)
 */
export function clopperPearsonInterval(x: number, n: number, level: number): { lower: number; upper: number } {
  requireTrials(x, n);
  requireProbability("level", level);
  const alpha = 1 - level;
  return {
    lower: x === 0 ? 0 : betaQuantile(alpha / 2, x, n - x + 1),
    upper: x === n ? 1 : betaQuantile(1 - alpha / 2, x + 1, n - x),
  };
}

/** Regularized upper incomplete gamma Q(s, t) for s > 0, t >= 0 (series below s + 1, continued fraction above). */
function upperIncompleteGamma(s: number, t: number): number {
  if (t <= 0) return 1;
  const lg = logGammaUnchecked(s);
  if (t < s + 1) {
    let sum = 1 / s;
    let term = sum;
    for (let k = 1; k < 10_000; k++) {
      term *= t / (s + k);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-17) break;
    }
    return 1 - sum * Math.exp(-t + s * Math.log(t) - lg);
  }
  let b = t + 1 - s;
  let c = 1 / 1e-300;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 10_000; i++) {
    const an = -i * (i - s);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < 1e-300) d = 1e-300;
    c = b + an / c;
    if (Math.abs(c) < 1e-300) c = 1e-300;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  return Math.exp(-t + s * Math.log(t) - lg) * h;
}

/** Standard normal lower-tail probability, via erfc(u) = Q(1/2, u^2). */
function normalCdf(z: number): number {
  const tail = 0.5 * upperIncompleteGamma(0.5, (z * z) / 2);
  return z < 0 ? tail : 1 - tail;
}

/**
 * Standard normal quantile for q in (0, 1): Acklam's rational approximation (relative error about
 * 1e-9) polished by one Halley step on the normal CDF.
 */
export function normalQuantile(q: number): number {
  requireProbability("q", q);
  const a = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
  const b = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
  const c = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];
  const pLow = 0.02425;
  let x: number;
  if (q < pLow) {
    const r = Math.sqrt(-2 * Math.log(q));
    x = (((((c[0] * r + c[1]) * r + c[2]) * r + c[3]) * r + c[4]) * r + c[5]) / ((((d[0] * r + d[1]) * r + d[2]) * r + d[3]) * r + 1);
  } else if (q <= 1 - pLow) {
    const u = q - 0.5;
    const r = u * u;
    x = ((((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * u) / (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1);
  } else {
    const r = Math.sqrt(-2 * Math.log1p(-q));
    x = -(((((c[0] * r + c[1]) * r + c[2]) * r + c[3]) * r + c[4]) * r + c[5]) / ((((d[0] * r + d[1]) * r + d[2]) * r + d[3]) * r + 1);
  }
  const e = normalCdf(x) - q;
  const u = e * Math.sqrt(2 * Math.PI) * Math.exp((x * x) / 2);
  return x - u / (1 + (x * u) / 2);
}

/**
 * Wilson score interval: the rates p whose score statistic |x - n p| / sqrt(n p (1 - p)) is at most
 * z = normal quantile (1 + level) / 2, i.e. (x + z^2/2 -/+ z sqrt(x (n - x) / n + z^2 / 4)) / (n + z^2).
 * @param x responders, integer, 0 <= x <= n
 * @param n patients, integer >= 1
 * @param level confidence level strictly between 0 and 1
 */
export function wilsonInterval(x: number, n: number, level: number): { lower: number; upper: number } {
  requireTrials(x, n);
  requireProbability("level", level);
  const z = normalQuantile(1 - (1 - level) / 2);
  const z2 = z * z;
  const centre = x + z2 / 2;
  const half = z * Math.sqrt((x * (n - x)) / n + z2 / 4);
  return {
    lower: x === 0 ? 0 : Math.max(0, (centre - half) / (n + z2)),
    upper: x === n ? 1 : Math.min(1, (centre + half) / (n + z2)),
  };
}
