/**
 * Predictive probabilities of success by backward recursion over the trial's states.
 *
 * The predictive probability at a state is the average of its values one patient later, weighted
 * by the posterior predictive probability of that patient's response (law of total probability):
 *   PP(n, x) = q PP(n + 1, x + 1) + (1 - q) PP(n + 1, x),  q = (a + x) / (a + b + n)
 * for a Beta(a, b) prior, starting from PP(nMax, x) = 1 when the final rule is met and 0 otherwise.
 * Every state costs O(1), so the whole table over n = first look .. nMax is O(nMax^2), instead of a
 * sum over all future outcomes at every state (lib/stats/reference/predictive.ts, which the tests
 * compare against to 1e-12).
 *
 * A mixture prior is handled component by component: each component's recursion runs with its own
 * q, and at a look the component tables are combined with the posterior mixture weights there,
 * which is the reference's sum over components of weight * component PP.
 *
 * Two arms with equal looks: a step adds one patient to each arm. The experimental arm's patient
 * is averaged out first (along xT), then the control arm's (along xC); the arms are independent
 * given the data, so the order does not matter. O(N^3) for N patients per arm.
 *
 * Exact 0 and 1: where both successors are equal the state takes that value unchanged, so a state
 * whose every future outcome succeeds (fails) is exactly 1 (0), as in the reference.
 */
import type { MixtureBeta } from "./types";
import { logBetaUnchecked } from "./distributions";
import { requireMixture } from "./priors";
import { requireCount, StatsDomainError } from "./validate";

/** Posterior weights of the mixture components after x of n (same formula as updateMixture). */
function posteriorWeights(prior: MixtureBeta, logPriorTerm: Float64Array, x: number, n: number, out: Float64Array): void {
  let max = -Infinity;
  for (let i = 0; i < prior.length; i++) {
    const c = prior[i];
    const l = logPriorTerm[i] + logBetaUnchecked(c.a + x, c.b + n - x);
    out[i] = l;
    if (l > max) max = l;
  }
  let total = 0;
  for (let i = 0; i < prior.length; i++) {
    const w = Math.exp(out[i] - max);
    out[i] = w;
    total += w;
  }
  for (let i = 0; i < prior.length; i++) out[i] /= total;
}

function logPriorTerms(prior: MixtureBeta): Float64Array {
  return Float64Array.from(prior, (c) => Math.log(c.weight) - logBetaUnchecked(c.a, c.b));
}

/** One step back, in place: row n + 1 becomes row n on the counts from..to (default 0..n). */
function stepSingle(row: Float64Array, n: number, a: number, ab: number, from = 0, to = n): void {
  const denom = ab + n;
  for (let x = from; x <= to; x++) {
    const lo = row[x];
    const hi = row[x + 1];
    if (lo !== hi) row[x] = lo + ((a + x) / denom) * (hi - lo);
  }
}

/**
 * Single-arm PP at every count of the given looks, `result[k][x]`, from the final success
 * indicators over 0..nMax. Same contract as singleArmPredictiveTable.
 */
export function singleArmPredictiveTableBackward(prior: MixtureBeta, looks: number[], nMax: number, finalSuccess: Uint8Array): Float64Array[] {
  requireMixture("prior", prior);
  requireCount("nMax", nMax);
  if (finalSuccess.length !== nMax + 1)
    throw new StatsDomainError("finalSuccess", finalSuccess.length, `must have length nMax + 1 = ${nMax + 1}`);
  let minLook = nMax;
  for (const n of looks) {
    requireCount("look", n);
    if (n > nMax) throw new StatsDomainError("look", n, `must not exceed nMax = ${nMax}`);
    if (n < minLook) minLook = n;
  }
  const out: Float64Array[] = looks.map((n) => new Float64Array(n + 1));
  if (looks.length === 0) return out;
  // Looks by size, so each row is copied out when the recursion passes it.
  const byN = new Map<number, number[]>();
  looks.forEach((n, k) => byN.set(n, [...(byN.get(n) ?? []), k]));
  const C = prior.length;
  const comps = prior.map(() => Float64Array.from(finalSuccess));
  const weights = new Float64Array(C);
  const logPrior = C > 1 ? logPriorTerms(prior) : null;
  for (let n = nMax; n >= minLook; n--) {
    if (n < nMax) for (let i = 0; i < C; i++) if (prior[i].weight !== 0) stepSingle(comps[i], n, prior[i].a, prior[i].a + prior[i].b);
    const ks = byN.get(n);
    if (!ks) continue;
    const dest = out[ks[0]];
    if (C === 1) dest.set(comps[0].subarray(0, n + 1));
    else for (let x = 0; x <= n; x++) dest[x] = combineComponents(prior, comps, logPrior as Float64Array, weights, x, n);
    for (let j = 1; j < ks.length; j++) out[ks[j]].set(dest);
  }
  return out;
}

/** PP at (n, x) of a mixture from the component values there, with the posterior weights. */
function combineComponents(prior: MixtureBeta, comps: Float64Array[], logPrior: Float64Array, weights: Float64Array, x: number, n: number): number {
  posteriorWeights(prior, logPrior, x, n, weights);
  let lo = 1;
  let hi = 0;
  let pp = 0;
  for (let i = 0; i < prior.length; i++) {
    if (prior[i].weight === 0) continue;
    const v = comps[i][x];
    if (v < lo) lo = v;
    if (v > hi) hi = v;
    pp += weights[i] * v;
  }
  // Every component exactly 0 (1): no future outcome succeeds (every one does).
  return hi === 0 ? 0 : lo === 1 ? 1 : pp < 0 ? 0 : pp > 1 ? 1 : pp;
}

/**
 * Single-arm PP at one state (x of n) by the same recursion restricted to the states reachable
 * from it (O((nMax - n)^2)), so it is bit for bit the value the table has at that state. Inputs
 * are validated by the caller.
 */
export function singleArmPredictiveAtBackward(prior: MixtureBeta, x: number, n: number, nMax: number, finalSuccess: Uint8Array): number {
  const C = prior.length;
  const comps = prior.map(() => Float64Array.from(finalSuccess));
  for (let j = nMax - 1; j >= n; j--)
    for (let i = 0; i < C; i++) if (prior[i].weight !== 0) stepSingle(comps[i], j, prior[i].a, prior[i].a + prior[i].b, x, x + (j - n));
  if (C === 1) return comps[0][x];
  return combineComponents(prior, comps, logPriorTerms(prior), new Float64Array(C), x, n);
}

/**
 * One two-arm step back, in place on a square with stride S: the state with n + 1 patients per arm
 * becomes the state with n per arm. Experimental patient first (xT direction), then control.
 */
function stepTwo(sq: Float64Array, S: number, n: number, aT: number, abT: number, aC: number, abC: number, qC: Float64Array): void {
  const denomT = abT + n;
  // xC runs to n + 1: the control arm still has n + 1 patients while the experimental one is averaged out.
  for (let xC = 0; xC <= n + 1; xC++) {
    const base = xC * S;
    for (let xT = 0; xT <= n; xT++) {
      const lo = sq[base + xT];
      const hi = sq[base + xT + 1];
      if (lo !== hi) sq[base + xT] = lo + ((aT + xT) / denomT) * (hi - lo);
    }
  }
  const denomC = abC + n;
  for (let xC = 0; xC <= n; xC++) qC[xC] = (aC + xC) / denomC;
  for (let xC = 0; xC <= n; xC++) {
    const base = xC * S;
    const up = base + S;
    const q = qC[xC];
    for (let xT = 0; xT <= n; xT++) {
      const lo = sq[base + xT];
      const hi = sq[up + xT];
      if (lo !== hi) sq[base + xT] = lo + q * (hi - lo);
    }
  }
}

/**
 * Two-arm PP at every (xT, xC) of each given look (both arms at n): `result[k][xC][xT]`, the
 * shape of twoArmPredictiveTableAtLook, for all looks in one backward pass.
 *
 * @param minSuccessT - the final rule: smallest xT (of N) that succeeds at each xC, N + 1 when none
 */
export function twoArmPredictiveTablesBackward(
  priorT: MixtureBeta,
  priorC: MixtureBeta,
  looks: number[],
  N: number,
  minSuccessT: Int32Array,
): Float64Array[][] {
  requireMixture("priorT", priorT);
  requireMixture("priorC", priorC);
  requireCount("nMaxPerArm", N);
  if (minSuccessT.length !== N + 1) throw new StatsDomainError("minSuccessT", minSuccessT.length, `must have length ${N + 1}`);
  let minLook = N;
  for (const n of looks) {
    requireCount("look", n);
    if (n > N) throw new StatsDomainError("look", n, `must not exceed nMaxPerArm = ${N}`);
    if (n < minLook) minLook = n;
  }
  const out: Float64Array[][] = looks.map((n) => Array.from({ length: n + 1 }, () => new Float64Array(n + 1)));
  if (looks.length === 0) return out;
  const byN = new Map<number, number[]>();
  looks.forEach((n, k) => byN.set(n, [...(byN.get(n) ?? []), k]));
  const S = N + 1;
  const pairs: { i: number; j: number; sq: Float64Array }[] = [];
  for (let i = 0; i < priorT.length; i++)
    for (let j = 0; j < priorC.length; j++) {
      if (priorT[i].weight === 0 || priorC[j].weight === 0) continue;
      const sq = new Float64Array(S * S);
      for (let xC = 0; xC <= N; xC++) sq.fill(1, xC * S + Math.min(minSuccessT[xC], S), xC * S + S);
      pairs.push({ i, j, sq });
    }
  const qC = new Float64Array(S);
  const wT = new Float64Array(priorT.length);
  const wC = new Float64Array(priorC.length);
  const mixed = priorT.length > 1 || priorC.length > 1;
  const logT = logPriorTerms(priorT);
  const logC = logPriorTerms(priorC);
  const weightsT: Float64Array[] = [];
  for (let n = N; n >= minLook; n--) {
    if (n < N)
      for (const p of pairs) {
        const t = priorT[p.i];
        const c = priorC[p.j];
        stepTwo(p.sq, S, n, t.a, t.a + t.b, c.a, c.b + c.a, qC);
      }
    const ks = byN.get(n);
    if (!ks) continue;
    const dest = out[ks[0]];
    if (!mixed) {
      const sq = pairs[0].sq;
      for (let xC = 0; xC <= n; xC++) dest[xC].set(sq.subarray(xC * S, xC * S + n + 1));
    } else {
      weightsT.length = 0;
      for (let xT = 0; xT <= n; xT++) {
        if (priorT.length > 1) posteriorWeights(priorT, logT, xT, n, wT);
        else wT[0] = 1;
        weightsT.push(Float64Array.from(wT));
      }
      for (let xC = 0; xC <= n; xC++) {
        if (priorC.length > 1) posteriorWeights(priorC, logC, xC, n, wC);
        else wC[0] = 1;
        const row = dest[xC];
        for (let xT = 0; xT <= n; xT++) {
          const w = weightsT[xT];
          let lo = 1;
          let hi = 0;
          let pp = 0;
          for (const p of pairs) {
            const v = p.sq[xC * S + xT];
            if (v < lo) lo = v;
            if (v > hi) hi = v;
            pp += w[p.i] * wC[p.j] * v;
          }
          row[xT] = hi === 0 ? 0 : lo === 1 ? 1 : pp < 0 ? 0 : pp > 1 ? 1 : pp;
        }
      }
    }
    for (let j = 1; j < ks.length; j++) for (let xC = 0; xC <= n; xC++) out[ks[j]][xC].set(dest[xC]);
  }
  return out;
}
