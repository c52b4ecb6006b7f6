/**
 * Predictive probability of success (Lee & Liu 2008, Clinical Trials 5:93-106).
 *
 * Single arm: with x responders of n and maximum sample size nMax, the m = nMax - n future
 * responders Y follow the posterior predictive distribution (a mixture of beta-binomials with the
 * posterior mixture weights), and
 *   PP = sum over y of P(Y = y) * 1[P(p > p0 | x + y responders of nMax) > thetaT].
 * Two arms: the same sum over the joint future (YT, YC) of both arms, with the final rule
 * P(pT - pC > delta | all data) > thetaT.
 *
 * PP is exactly 1 when every possible future outcome succeeds and exactly 0 when none does, so a
 * threshold at 0 or 1 behaves as the charter reads.
 *
 * The single-arm PP (one state or a table) and the two-arm tables are computed by backward
 * recursion (lib/stats/backward.ts); the two-arm PP at one state, where the arms may have different
 * counts, by the sum over the joint future. The sums of the earlier engine are kept in
 * lib/stats/reference/ and the tests check the recursion against them to 1e-12.
 */
import type { MixtureBeta } from "./types";
import { mixtureSurvival, requireMixture, updateMixture } from "./priors";
import { probDifferenceExceeds } from "./difference";
import { requireCount, requireData, requireFinite, requireProbability, StatsDomainError } from "./validate";
import { exceedsThreshold } from "./compare";
import { singleArmPredictiveAtBackward, singleArmPredictiveTableBackward, twoArmPredictiveTablesBackward } from "./backward";

/** Posterior mixture after x of n; a one-component prior skips the weight update (its weight stays 1). */
export function posteriorMixture(prior: MixtureBeta, x: number, n: number): MixtureBeta {
  if (prior.length === 1) {
    requireData(x, n);
    return [{ weight: 1, a: prior[0].a + x, b: prior[0].b + n - x }];
  }
  return updateMixture(prior, x, n);
}

/**
 * BetaBinomial(m, a, b) mass function written into out[0..m] (no validation; a, b > 0).
 * The ratio recurrence P(k+1)/P(k) = (m-k)(a+k) / ((k+1)(b+m-k-1)) is run up and down from the
 * count nearest the mean, where the mass is largest, with that term set to 1, and the result is
 * normalised by its sum: no special functions, no underflow of the bulk, and the total is 1 to
 * rounding. Terms more than ~1e-308 below the largest underflow to 0, which they are to double
 * precision anyway.
 */
function fillBetaBinomial(m: number, a: number, b: number, out: Float64Array): void {
  let k0 = Math.round((m * a) / (a + b));
  if (k0 > m) k0 = m;
  out[k0] = 1;
  let total = 1;
  for (let k = k0; k < m; k++) {
    const v = (out[k] * (m - k) * (a + k)) / ((k + 1) * (b + m - k - 1));
    out[k + 1] = v;
    total += v;
  }
  for (let k = k0; k > 0; k--) {
    const v = (out[k] * k * (b + m - k)) / ((m - k + 1) * (a + k - 1));
    out[k - 1] = v;
    total += v;
  }
  for (let k = 0; k <= m; k++) out[k] /= total;
}

/**
 * Predictive distribution of the m = nMax - n future responders written into out[0..m], from the
 * posterior mixture after x of n (validated by the caller). `scratch` holds one component at a
 * time for mixtures; both buffers need length >= m + 1.
 */
function fillPredictive(prior: MixtureBeta, x: number, n: number, nMax: number, out: Float64Array, scratch: Float64Array): void {
  const m = nMax - n;
  if (prior.length === 1) {
    fillBetaBinomial(m, prior[0].a + x, prior[0].b + n - x, out);
    return;
  }
  const post = updateMixture(prior, x, n);
  out.fill(0, 0, m + 1);
  for (const c of post) {
    if (c.weight === 0) continue;
    fillBetaBinomial(m, c.a, c.b, scratch);
    for (let y = 0; y <= m; y++) out[y] += c.weight * scratch[y];
  }
}

/**
 * Posterior predictive distribution of the number of future responders among nMax - n patients,
 * after x responders of n: sum over posterior components of weight * BetaBinomial(nMax - n, a, b).
 *
 * @param prior - resolved prior mixture (weights sum to 1, shapes > 0)
 * @param x - responders so far, integer 0 <= x <= n
 * @param n - patients evaluated so far, integer 0 <= n <= nMax
 * @param nMax - maximum sample size, integer
 * @returns array of length nMax - n + 1 with P(Y = y); [1] when n = nMax
 */
export function predictiveDistribution(prior: MixtureBeta, x: number, n: number, nMax: number): Float64Array {
  requireMixture("prior", prior);
  requireCount("nMax", nMax);
  requireData(x, n);
  if (n > nMax) throw new StatsDomainError("n", n, `must not exceed nMax = ${nMax}`);
  const m = nMax - n;
  const out = new Float64Array(m + 1);
  fillPredictive(prior, x, n, nMax, out, new Float64Array(m + 1));
  return out;
}

/**
 * Final-analysis success indicators for a single arm: element x is 1 when
 * P(p > p0 | x responders of nMax) > thetaT (strict; a tie is not success), else 0.
 *
 * @param prior - resolved prior mixture
 * @param nMax - maximum sample size, positive integer
 * @param p0 - uninteresting response rate, 0 < p0 < 1
 * @param thetaT - success threshold, 0 <= thetaT <= 1 (thetaT = 1 can never be exceeded)
 * @returns Uint8Array of length nMax + 1
 */
export function singleArmFinalSuccess(prior: MixtureBeta, nMax: number, p0: number, thetaT: number): Uint8Array {
  requireMixture("prior", prior);
  requireCount("nMax", nMax);
  requireProbability("p0", p0);
  requireProbability("thetaT", thetaT, { closed: true });
  const out = new Uint8Array(nMax + 1);
  // P(p > p0 | x of nMax) increases with x (the binomial likelihood ratio is monotone in p), so the
  // success set is an upper set of counts: bisect for its smallest member (O(log nMax) evaluations).
  const succeeds = (x: number) => exceedsThreshold(mixtureSurvival(posteriorMixture(prior, x, nMax), p0), thetaT);
  let lo = 0;
  let hi = nMax + 1; // smallest success lies in [lo, hi]; hi = nMax + 1 means none
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (succeeds(mid)) hi = mid;
    else lo = mid + 1;
  }
  out.fill(1, lo);
  return out;
}

/**
 * PP from a predictive distribution and the final success indicators, with the exact 0 / 1 rule.
 * Summation runs over y in increasing order so every caller gets bit-identical values.
 *
 * @param pmf - P(Y = y), y = 0..m
 * @param finalSuccess - indicators over total responders 0..nMax (length nMax + 1)
 * @param x - responders so far; x + m must not exceed nMax
 * @param m - future patients (default: pmf.length - 1; a longer buffer may be passed)
 */
export function predictiveFromDistribution(pmf: Float64Array, finalSuccess: Uint8Array, x: number, m: number = pmf.length - 1): number {
  if (x + m > finalSuccess.length - 1)
    throw new StatsDomainError("x", x, `plus ${m} future patients must not exceed nMax = ${finalSuccess.length - 1}`);
  let sum = 0;
  let successes = 0;
  for (let y = 0; y <= m; y++) {
    if (finalSuccess[x + y] === 1) {
      sum += pmf[y];
      successes++;
    }
  }
  if (successes === 0) return 0;
  if (successes === m + 1) return 1;
  return sum < 0 ? 0 : sum > 1 ? 1 : sum;
}

/**
 * Single-arm predictive probability of success (Lee & Liu 2008).
 *
 * @param args.prior - resolved prior mixture
 * @param args.x - responders so far, integer 0 <= x <= n
 * @param args.n - patients so far, integer 0 <= n <= nMax
 * @param args.nMax - maximum sample size, positive integer
 * @param args.p0 - uninteresting rate, 0 < p0 < 1
 * @param args.thetaT - final success threshold, 0 <= thetaT <= 1
 * @param args.finalSuccess - optional precomputed `singleArmFinalSuccess(prior, nMax, p0, thetaT)`
 * @returns PP in [0, 1]; exactly 0 or 1 when no or every future outcome succeeds; at n = nMax,
 *   1 if the final rule is met and 0 otherwise.
 * @example predictiveProbabilitySingleArm({ prior: [{ weight: 1, a: 0.6, b: 0.4 }], x: 16, n: 23, nMax: 40, p0: 0.6, thetaT: 0.9 }) // about 0.566
 */
export function predictiveProbabilitySingleArm(args: {
  prior: MixtureBeta;
  x: number;
  n: number;
  nMax: number;
  p0: number;
  thetaT: number;
  finalSuccess?: Uint8Array;
}): number {
  const { prior, x, n, nMax, p0, thetaT } = args;
  requireMixture("prior", prior);
  requireCount("nMax", nMax);
  requireData(x, n);
  if (n > nMax) throw new StatsDomainError("n", n, `must not exceed nMax = ${nMax}`);
  const success = args.finalSuccess ?? singleArmFinalSuccess(prior, nMax, p0, thetaT);
  if (success.length !== nMax + 1) throw new StatsDomainError("finalSuccess", success.length, `must have length nMax + 1 = ${nMax + 1}`);
  return singleArmPredictiveAtBackward(prior, x, n, nMax, success);
}

/**
 * Single-arm PP at every count of the given looks: `result[k][x]`, by the backward recursion of
 * lib/stats/backward.ts (O(nMax^2) for the whole table). It agrees with the sum over future
 * outcomes of `predictiveProbabilitySingleArm` to about 1e-14, far inside the threshold tie
 * tolerance (compare.ts), so boundary tables, calibration and the decision at a look agree.
 */
export function singleArmPredictiveTable(prior: MixtureBeta, looks: number[], nMax: number, finalSuccess: Uint8Array): Float64Array[] {
  return singleArmPredictiveTableBackward(prior, looks, nMax, finalSuccess);
}

// ---------------------------------------------------------------------------------------------
// Two arms
// ---------------------------------------------------------------------------------------------

/**
 * For each control count xC in 0..nC, the smallest experimental count xT in 0..nT for which
 * `holds(xT, xC)` is true (nT + 1 when none), for a predicate that is upward closed in xT and
 * downward closed in xC. P(pT - pC > delta | xT, xC) is such a predicate's probability: with
 * independent arms the posterior of pT is stochastically increasing in xT and that of pC in xC
 * (binomial likelihood ratio is monotone in p). The walk evaluates the predicate at most
 * nT + nC + 2 times instead of (nT + 1)(nC + 1).
 */
export function monotoneThresholds(nT: number, nC: number, holds: (xT: number, xC: number) => boolean): Int32Array {
  requireCount("nT", nT);
  requireCount("nC", nC);
  const out = new Int32Array(nC + 1);
  let t = 0;
  for (let xC = 0; xC <= nC; xC++) {
    while (t <= nT && !holds(t, xC)) t++;
    out[xC] = t;
  }
  return out;
}

/**
 * The two-arm final success rule, tabulated once per design: `minSuccessT[xC]` is the smallest
 * experimental responder count (of nMaxPerArm) with P(pT - pC > delta | xT, xC) > thetaT, or
 * nMaxPerArm + 1 when no count succeeds.
 */
export type TwoArmFinalRule = {
  nMaxPerArm: number;
  delta: number;
  thetaT: number;
  minSuccessT: Int32Array;
};

/**
 * Tabulate the two-arm final rule P(pT - pC > delta | all data) > thetaT over all (xT, xC).
 *
 * @param priorT - resolved prior of the experimental arm
 * @param priorC - resolved prior of the control arm
 * @param nMaxPerArm - maximum patients per arm, positive integer
 * @param delta - margin on the difference scale, -1 < delta < 1 (negative: non-inferiority)
 * @param thetaT - success threshold, 0 <= thetaT <= 1
 */
export function twoArmFinalRule(
  priorT: MixtureBeta,
  priorC: MixtureBeta,
  nMaxPerArm: number,
  delta: number,
  thetaT: number,
): TwoArmFinalRule {
  requireMixture("priorT", priorT);
  requireMixture("priorC", priorC);
  requireCount("nMaxPerArm", nMaxPerArm);
  requireDelta(delta);
  requireProbability("thetaT", thetaT, { closed: true });
  const postT: MixtureBeta[] = [];
  const postC: MixtureBeta[] = [];
  for (let x = 0; x <= nMaxPerArm; x++) {
    postT.push(posteriorMixture(priorT, x, nMaxPerArm));
    postC.push(posteriorMixture(priorC, x, nMaxPerArm));
  }
  const minSuccessT = monotoneThresholds(
    nMaxPerArm,
    nMaxPerArm,
    (xT, xC) => exceedsThreshold(probDifferenceExceeds(postT[xT], postC[xC], delta), thetaT),
  );
  return { nMaxPerArm, delta, thetaT, minSuccessT };
}

export function requireDelta(delta: number): void {
  requireFinite("delta", delta);
  if (!(delta > -1 && delta < 1)) throw new StatsDomainError("delta", delta, "must lie strictly between -1 and 1");
}

/** P(Y >= k) for k = 0..m+1 from a pmf, summed from the top so small tails keep their precision. */
function upperTails(pmf: Float64Array): Float64Array {
  const m = pmf.length - 1;
  const tail = new Float64Array(m + 2);
  for (let k = m; k >= 0; k--) tail[k] = tail[k + 1] + pmf[k];
  return tail;
}

/** PP over the joint future from the two predictive distributions, with the exact 0 / 1 rule. */
function twoArmPredictiveFromDistributions(
  pmfT: Float64Array,
  tailT: Float64Array,
  pmfC: Float64Array,
  xT: number,
  xC: number,
  rule: TwoArmFinalRule,
): number {
  const mT = pmfT.length - 1;
  const mC = pmfC.length - 1;
  const thr = rule.minSuccessT;
  // Worst future for success is yT = 0 with yC = mC; best is yT = mT with yC = 0.
  if (thr[xC + mC] <= xT) return 1;
  if (thr[xC] > xT + mT) return 0;
  let sum = 0;
  for (let yC = 0; yC <= mC; yC++) {
    const need = thr[xC + yC] - xT;
    if (need > mT) continue;
    sum += pmfC[yC] * tailT[need < 0 ? 0 : need];
  }
  return sum < 0 ? 0 : sum > 1 ? 1 : sum;
}

/**
 * Two-arm predictive probability of success over the joint future of both arms.
 *
 * @param args.priorT, args.priorC - resolved priors
 * @param args.xT, args.nT - experimental responders and patients so far (0 <= xT <= nT <= nMaxPerArm)
 * @param args.xC, args.nC - control responders and patients so far (0 <= xC <= nC <= nMaxPerArm)
 * @param args.finalRule - from `twoArmFinalRule` (its nMaxPerArm, delta and thetaT define success)
 * @returns PP in [0, 1], exactly 0 / 1 when no / every joint future outcome succeeds.
 */
export function predictiveProbabilityTwoArm(args: {
  priorT: MixtureBeta;
  priorC: MixtureBeta;
  xT: number;
  nT: number;
  xC: number;
  nC: number;
  finalRule: TwoArmFinalRule;
}): number {
  const { priorT, priorC, xT, nT, xC, nC, finalRule } = args;
  requireMixture("priorT", priorT);
  requireMixture("priorC", priorC);
  const N = finalRule.nMaxPerArm;
  if (nT > N) throw new StatsDomainError("nT", nT, `must not exceed nMaxPerArm = ${N}`);
  if (nC > N) throw new StatsDomainError("nC", nC, `must not exceed nMaxPerArm = ${N}`);
  const pmfT = predictiveDistribution(priorT, xT, nT, N);
  const pmfC = predictiveDistribution(priorC, xC, nC, N);
  return twoArmPredictiveFromDistributions(pmfT, upperTails(pmfT), pmfC, xT, xC, finalRule);
}

/**
 * PP at every (xT, xC) of a look with n patients in each arm: `result[xC][xT]`, by the joint
 * backward recursion (lib/stats/backward.ts). For several looks, `twoArmPredictiveTablesBackward`
 * does all of them in one pass.
 */
export function twoArmPredictiveTableAtLook(
  priorT: MixtureBeta,
  priorC: MixtureBeta,
  n: number,
  finalRule: TwoArmFinalRule,
): Float64Array[] {
  requireCount("n", n);
  if (n > finalRule.nMaxPerArm) throw new StatsDomainError("n", n, `must not exceed nMaxPerArm = ${finalRule.nMaxPerArm}`);
  return twoArmPredictiveTablesBackward(priorT, priorC, [n], finalRule.nMaxPerArm, finalRule.minSuccessT)[0];
}
