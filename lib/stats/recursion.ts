/**
 * The exact forward recursions behind the operating characteristics, on integer boundaries, with
 * reusable buffers and the running mass kept on the counts still enrolling (stopped counts are
 * dropped, so later looks cost less). Shared by operating-characteristics.ts and both calibrations.
 *
 * Boundaries per look k (fMax = -1: no futility stop; eMin = n + 1: no efficacy stop). A count
 * that both would stop is a futility stop (futility is checked first). At the final look every
 * count still running that does not reach eMin is "no success" and is booked with futility.
 *
 * The arithmetic is that of lib/stats/reference/operating-characteristics.ts (increments
 * convolved look by look, experimental arm along rows then control arm down columns); the tests
 * compare them to 1e-12.
 */

import { exceedsThreshold, fallsBelowThreshold } from "./compare";

/**
 * Largest x with stat[x] below the threshold (-1: none). The statistic is non-decreasing in the
 * count (see boundaries.ts), so the futility set is a lower set and bisection finds its top.
 */
export function futilityTop(stat: Float64Array, threshold: number): number {
  let lo = -1;
  let hi = stat.length - 1; // answer in [lo, hi]
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (fallsBelowThreshold(stat[mid], threshold)) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}

/** Smallest x with stat[x] above the threshold (stat.length: none); the efficacy set is an upper set. */
export function efficacyBottom(stat: Float64Array, threshold: number): number {
  let lo = 0;
  let hi = stat.length; // answer in [lo, hi]
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (exceedsThreshold(stat[mid], threshold)) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

/** Per-look stopping probabilities written by the recursions (length = number of looks). */
type LookArrays = { fut: Float64Array; eff: Float64Array; cont: Float64Array };

export function lookArrays(K: number): LookArrays {
  return { fut: new Float64Array(K), eff: new Float64Array(K), cont: new Float64Array(K) };
}

export type RecursionSummary = {
  declareSuccess: number;
  expectedSampleSize: number;
  earlyTermination: number;
  earlyFutility: number;
  earlyEfficacy: number;
};

function summarise(looks: number[], out: LookArrays): RecursionSummary {
  const last = looks.length - 1;
  let early = 0;
  let earlyFut = 0;
  let earlyEff = 0;
  let en = 0;
  for (let k = 0; k < last; k++) {
    earlyFut += out.fut[k];
    earlyEff += out.eff[k];
    en += looks[k] * (out.fut[k] + out.eff[k]);
  }
  early = earlyFut + earlyEff;
  en += looks[last] * (out.fut[last] + out.eff[last]);
  return { declareSuccess: earlyEff + out.eff[last], expectedSampleSize: en, earlyTermination: early, earlyFutility: earlyFut, earlyEfficacy: earlyEff };
}

/**
 * Single arm. `incs[k]` is the Binomial(looks[k] - looks[k-1], p) mass function.
 * `buf` needs length >= nMax + 1 and is overwritten. Per-look probabilities go to `out` when given
 * (the calibration needs only the summary and skips them).
 */
export function singleArmForward(
  looks: number[],
  fMax: ArrayLike<number>,
  eMin: ArrayLike<number>,
  incs: Float64Array[],
  buf: Float64Array,
  out: LookArrays | null,
): RecursionSummary {
  const K = looks.length;
  if (out) {
    out.fut.fill(0);
    out.eff.fill(0);
    out.cont.fill(0);
  }
  const d = buf;
  d[0] = 1;
  let lo = 0;
  let hi = 0;
  let earlyFut = 0;
  let earlyEff = 0;
  let en = 0;
  let eff = 0;
  for (let k = 0; k < K; k++) {
    const n = looks[k];
    const inc = incs[k];
    const g = inc.length - 1;
    // In place, from the top down: new[x] = sum_y old[x - y] inc[y] reads only counts not yet overwritten.
    if (g === 1) {
      const i0 = inc[0];
      const i1 = inc[1];
      d[hi + 1] = d[hi] * i1;
      for (let x = hi; x > lo; x--) d[x] = d[x] * i0 + d[x - 1] * i1;
      d[lo] = d[lo] * i0;
    } else if (g > 1) {
      for (let x = hi + g; x >= lo; x--) {
        let s = 0;
        const yFrom = x - hi > 0 ? x - hi : 0;
        const yTo = x - lo < g ? x - lo : g;
        for (let y = yFrom; y <= yTo; y++) s += d[x - y] * inc[y];
        d[x] = s;
      }
    }
    hi += g;
    const final = k === K - 1;
    const f = fMax[k];
    const e = eMin[k] > f ? eMin[k] : f + 1;
    let fut = 0;
    let ef = 0;
    const fTop = f < hi ? f : hi;
    for (let x = lo; x <= fTop; x++) fut += d[x];
    for (let x = e > lo ? e : lo; x <= hi; x++) ef += d[x];
    if (f + 1 > lo) lo = f + 1;
    if (e - 1 < hi) hi = e - 1;
    let cont = 0;
    if (out || final) for (let x = lo; x <= hi; x++) cont += d[x];
    if (final) {
      fut += cont;
      cont = 0;
      eff += ef;
      en += n * (fut + ef);
    } else {
      earlyFut += fut;
      earlyEff += ef;
      eff += ef;
      en += n * (fut + ef);
    }
    if (out) {
      out.fut[k] = fut;
      out.eff[k] = ef;
      out.cont[k] = cont;
    }
    // Every trial has stopped: later looks see nothing.
    if (lo > hi) break;
  }
  return { declareSuccess: eff, expectedSampleSize: en, earlyTermination: earlyFut + earlyEff, earlyFutility: earlyFut, earlyEfficacy: earlyEff };
}

/**
 * Two arms with equal per-arm looks: the joint (xT, xC) counts on a square of stride N + 1, with
 * the enrolling range of xT kept per control count.
 */
export class JointRecursion {
  readonly S: number;
  private cur: Float64Array;
  private nxt: Float64Array;
  private rows: Float64Array;
  private lo: Int32Array;
  private hi: Int32Array;
  private nlo: Int32Array;
  private nhi: Int32Array;
  private suffix: Float64Array;
  readonly out: LookArrays;
  constructor(
    private readonly looks: number[],
    N: number,
  ) {
    this.S = N + 1;
    const size = this.S * this.S;
    this.cur = new Float64Array(size);
    this.nxt = new Float64Array(size);
    this.rows = new Float64Array(size);
    this.lo = new Int32Array(this.S);
    this.hi = new Int32Array(this.S);
    this.nlo = new Int32Array(this.S);
    this.nhi = new Int32Array(this.S);
    this.suffix = new Float64Array(this.S + 1);
    this.out = lookArrays(looks.length);
  }

  /**
   * @param fMax - per look, per control count: largest xT that stops for futility (-1: none); final look: largest xT without success
   * @param eMin - per look, per control count: smallest xT that stops for efficacy (n + 1: none); final look: smallest xT with success
   * @param incT, incC - per look, the binomial increments of each arm since the previous look
   * Per-look probabilities are left in `this.out` (P(continuing) only with `withContinuing`; the
   * calibrations, which need the summary alone, skip that sum).
   */
  run(fMax: ArrayLike<number>[], eMin: ArrayLike<number>[], incT: Float64Array[], incC: Float64Array[], withContinuing = true): RecursionSummary {
    const { S, looks, rows, out } = this;
    let cur = this.cur;
    let nxt = this.nxt;
    let lo = this.lo;
    let hi = this.hi;
    let nlo = this.nlo;
    let nhi = this.nhi;
    out.fut.fill(0);
    out.eff.fill(0);
    out.cont.fill(0);
    cur[0] = 1;
    lo[0] = 0;
    hi[0] = 0;
    let cLo = 0;
    let cHi = 0;
    const last = looks.length - 1;
    for (let k = 0; k <= last; k++) {
      const it = incT[k];
      const ic = incC[k];
      const g = it.length - 1;
      // Experimental increments along each enrolling row.
      for (let xC = cLo; xC <= cHi; xC++) {
        const a = lo[xC];
        const b = hi[xC];
        if (a > b) continue;
        const base = xC * S;
        rows.fill(0, base + a, base + b + g + 1);
        for (let xT = a; xT <= b; xT++) {
          const v = cur[base + xT];
          if (v === 0) continue;
          const d = base + xT;
          for (let y = 0; y <= g; y++) rows[d + y] += v * it[y];
        }
      }
      if (k === last) {
        // The final analysis needs only P(success) and P(no success): each row's mass from a count
        // xT up (suffix sums) times the control increment that lands it on a row where xT succeeds,
        // instead of spreading the whole square down the columns first.
        const fk = fMax[k];
        const ek = eMin[k];
        const sfx = this.suffix;
        let ef = 0;
        let total = 0;
        for (let xC = cLo; xC <= cHi; xC++) {
          const a = lo[xC];
          if (a > hi[xC]) continue;
          const b = hi[xC] + g;
          const base = xC * S;
          sfx[b + 1] = 0;
          for (let xT = b; xT >= a; xT--) sfx[xT] = sfx[xT + 1] + rows[base + xT];
          const rowMass = sfx[a];
          for (let y = 0; y <= g; y++) {
            const c = ic[y];
            if (c === 0) continue;
            total += c * rowMass;
            const x2 = xC + y;
            // Futility is checked first: success needs xT above fMax and at least eMin.
            const e = ek[x2] > fk[x2] ? ek[x2] : fk[x2] + 1;
            if (e <= a) ef += c * rowMass;
            else if (e <= b) ef += c * sfx[e];
          }
        }
        out.fut[k] = total - ef;
        out.eff[k] = ef;
        break;
      }
      // New enrolling ranges: row xC' collects rows xC' - g .. xC'.
      const ncLo = cLo;
      const ncHi = cHi + g;
      for (let x = ncLo; x <= ncHi; x++) {
        let a = S;
        let b = -1;
        const from = x - g < cLo ? cLo : x - g;
        const to = x < cHi ? x : cHi;
        for (let xC = from; xC <= to; xC++) {
          if (lo[xC] > hi[xC]) continue;
          if (lo[xC] < a) a = lo[xC];
          if (hi[xC] + g > b) b = hi[xC] + g;
        }
        nlo[x] = a;
        nhi[x] = b;
        if (a <= b) nxt.fill(0, x * S + a, x * S + b + 1);
      }
      // Control increments down the columns.
      for (let xC = cLo; xC <= cHi; xC++) {
        const a = lo[xC];
        const b = hi[xC] + g;
        if (lo[xC] > hi[xC]) continue;
        const src = xC * S;
        for (let y = 0; y <= g; y++) {
          const c = ic[y];
          if (c === 0) continue;
          const dst = (xC + y) * S;
          for (let xT = a; xT <= b; xT++) nxt[dst + xT] += rows[src + xT] * c;
        }
      }
      const t = cur;
      cur = nxt;
      nxt = t;
      let ti = lo;
      lo = nlo;
      nlo = ti;
      ti = hi;
      hi = nhi;
      nhi = ti;
      cLo = ncLo;
      cHi = ncHi;
      // Stops.
      const fk = fMax[k];
      const ek = eMin[k];
      let fut = 0;
      let ef = 0;
      let rest = 0;
      let first = -1;
      let lastAlive = -1;
      for (let xC = cLo; xC <= cHi; xC++) {
        let a = lo[xC];
        let b = hi[xC];
        if (a > b) continue;
        const base = xC * S;
        const f = fk[xC];
        const e = ek[xC] > f ? ek[xC] : f + 1;
        const fTop = f < b ? f : b;
        for (let xT = a; xT <= fTop; xT++) fut += cur[base + xT];
        for (let xT = e > a ? e : a; xT <= b; xT++) ef += cur[base + xT];
        if (f + 1 > a) a = f + 1;
        if (e - 1 < b) b = e - 1;
        lo[xC] = a;
        hi[xC] = b;
        if (a <= b) {
          if (withContinuing) for (let xT = a; xT <= b; xT++) rest += cur[base + xT];
          if (first < 0) first = xC;
          lastAlive = xC;
        }
      }
      // (The final look was booked above.)
      out.fut[k] = fut;
      out.eff[k] = ef;
      out.cont[k] = rest;
      if (first < 0) break;
      cLo = first;
      cHi = lastAlive;
    }
    // Keep the swapped buffers for the next run (only [0] needs to be right; the rest is zeroed before use).
    this.cur = cur;
    this.nxt = nxt;
    this.lo = lo;
    this.hi = hi;
    this.nlo = nlo;
    this.nhi = nhi;
    return summarise(looks, out);
  }
}
