// Reference implementation, kept unchanged (import paths only) to check the fast paths in lib/stats against.
/**
 * Threshold search for a two-arm design (equal allocation, per-arm looks): among the grid points
 * whose type I error (the maximum over control rates on the null boundary pT = pC + delta, as in
 * twoArmTypeIErrorAndPower) is at most the limit and whose power at the design's alternative is at
 * least the target, the designs with the smallest expected per-arm sample size at the null point.
 *
 * What depends on what:
 * - the final success table (twoArmFinalRule) depends on thetaT only; the predictive tables of the
 *   interim looks (twoArmPredictiveTableAtLook) depend on the final table, so both are built once per
 *   distinct final table (many thetaT values share one) and cached across calls, so a job that splits
 *   one thetaT into several slices still builds them once;
 * - the posterior-probability rules' interim statistic P(pT - pC > delta | xT, xC) depends on no
 *   threshold and is tabulated once per call;
 * - a (thetaL, thetaU) pair only cuts boundaries out of those tables, and the exact recursion over
 *   the joint (xT, xC) counts is then run once per rate pair, on the part of the square that is still
 *   enrolling (stopped counts are dropped, so later looks cost less).
 * The recursion is the same arithmetic as exactTwoArmOperatingCharacteristics (futility is checked
 * before efficacy at a count both would stop); calibration-two-arm.test.ts checks the best designs
 * against twoArmTypeIErrorAndPower on the chosen thresholds.
 */
import type { MixtureBeta, TwoArmDesign } from "../types";
import { binomialPmfs } from "../distributions";
import { posteriorMixture, twoArmFinalRule, twoArmPredictiveTableAtLook, type TwoArmFinalRule } from "./predictive";
import { validateTwoArmDesign } from "../decision";
import { probDifferenceExceeds } from "../difference";
import { TWO_ARM_NULL_CONTROL_RATES } from "./operating-characteristics";
import { requireProbability, StatsDomainError } from "../validate";
import { exceedsThreshold, fallsBelowThreshold } from "../compare";
import type { CalibratedDesign, CalibrationOptions, CalibrationResult } from "./calibration";

export type TwoArmCalibrationOptions = CalibrationOptions & {
  /** Control rates of the type I error maximum (default TWO_ARM_NULL_CONTROL_RATES; the design's control rate is always added). */
  controlRates?: readonly number[];
};

/**
 * A design found by the two-arm search. Sample sizes are per arm; the "Null" fields are at the null
 * point of twoArmErrorRatesFromBoundaries (the assumed control rate on the null boundary when it lies
 * inside (0, 1), else where the type I error is largest).
 */
export type TwoArmCalibratedDesign = CalibratedDesign & {
  /** Where on the null boundary the largest type I error occurs. */
  typeIErrorMaxAt: { controlRate: number; experimentalRate: number };
};

export type TwoArmCalibrationResult = Omit<CalibrationResult, "best"> & { best: TwoArmCalibratedDesign[] };

type Summary = { declareSuccess: number; expectedSampleSize: number; earlyTermination: number; earlyFutility: number; earlyEfficacy: number };

/** pC + delta without binary noise; the same rounding as twoArmErrorRatesFromBoundaries. */
const onNullBoundary = (pC: number, delta: number) => Math.round((pC + delta) * 1e12) / 1e12;
const insideUnit = (p: number) => p > 0 && p < 1;

/** The null-boundary control rates of twoArmErrorRatesFromBoundaries, in the same order. */
export function twoArmNullControlRates(design: Pick<TwoArmDesign, "delta" | "controlRate">, controlRates: readonly number[] = TWO_ARM_NULL_CONTROL_RATES): number[] {
  const { delta, controlRate } = design;
  controlRates.forEach((r, i) => requireProbability(`controlRates[${i}]`, r));
  let rates = [...new Set([...controlRates, controlRate])].filter((pC) => insideUnit(onNullBoundary(pC, delta))).sort((u, v) => u - v);
  if (rates.length === 0) rates = [(Math.max(0, -delta) + Math.min(1, 1 - delta)) / 2];
  return rates;
}

/**
 * Reusable buffers for the joint recursion: the square of counts (stride N + 1) and the enrolling
 * range of xT per control count.
 */
class JointRecursion {
  readonly S: number;
  private cur: Float64Array;
  private nxt: Float64Array;
  private rows: Float64Array;
  private lo: Int32Array;
  private hi: Int32Array;
  private nlo: Int32Array;
  private nhi: Int32Array;
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
  }

  /**
   * @param fMax - per look, per control count: largest xT that stops for futility (-1: none); final look: largest xT without success
   * @param eMin - per look, per control count: smallest xT that stops for efficacy (n + 1: none); final look: smallest xT with success
   * @param incT, incC - per look, the binomial increments of each arm since the previous look
   */
  run(fMax: Int32Array[], eMin: Int32Array[], incT: Float64Array[], incC: Float64Array[]): Summary {
    const { S, looks, rows } = this;
    let cur = this.cur;
    let nxt = this.nxt;
    let lo = this.lo;
    let hi = this.hi;
    let nlo = this.nlo;
    let nhi = this.nhi;
    cur[0] = 1;
    lo[0] = 0;
    hi[0] = 0;
    let cLo = 0;
    let cHi = 0;
    let early = 0;
    let earlyFut = 0;
    let earlyEff = 0;
    let eff = 0;
    let en = 0;
    const last = looks.length - 1;
    for (let k = 0; k <= last; k++) {
      const n = looks[k];
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
          if (k === last) for (let xT = a; xT <= b; xT++) rest += cur[base + xT];
          if (first < 0) first = xC;
          lastAlive = xC;
        }
      }
      if (k < last) {
        early += fut + ef;
        earlyFut += fut;
        earlyEff += ef;
        eff += ef;
        en += n * (fut + ef);
      } else {
        eff += ef;
        en += n * (fut + ef + rest);
      }
      if (first < 0) break;
      cLo = first;
      cHi = lastAlive;
    }
    // Leave the buffers as found for the next run (only [0] needs to be right; the rest is zeroed before use).
    this.cur = cur;
    this.nxt = nxt;
    this.lo = lo;
    this.hi = hi;
    this.nlo = nlo;
    this.nhi = nhi;
    return { declareSuccess: eff, expectedSampleSize: en, earlyTermination: early, earlyFutility: earlyFut, earlyEfficacy: earlyEff };
  }
}

/** Per distinct final success table: the final boundary and (predictive rule) the interim PP tables. */
type FinalTables = { finalRule: TwoArmFinalRule; interimStats: Float64Array[][] | null };
const finalTablesCache = new Map<string, FinalTables>();

function finalTablesFor(priorT: MixtureBeta, priorC: MixtureBeta, design: TwoArmDesign, interim: number[], thetaT: number, predictive: boolean): FinalTables {
  const finalRule = twoArmFinalRule(priorT, priorC, design.nMaxPerArm, design.delta, thetaT);
  const key = JSON.stringify([priorT, priorC, design.nMaxPerArm, design.delta, interim, predictive, Array.from(finalRule.minSuccessT)]);
  const hit = finalTablesCache.get(key);
  if (hit) return hit;
  const tables: FinalTables = {
    finalRule,
    interimStats: predictive ? interim.map((n) => twoArmPredictiveTableAtLook(priorT, priorC, n, finalRule)) : null,
  };
  if (finalTablesCache.size >= 8) finalTablesCache.delete(finalTablesCache.keys().next().value as string);
  finalTablesCache.set(key, tables);
  return tables;
}

/** P(pT - pC > delta | xT, xC) at each interim look, `[k][xC][xT]`: the posterior rules' statistic. */
function posteriorInterimStatistics(priorT: MixtureBeta, priorC: MixtureBeta, delta: number, interim: number[]): Float64Array[][] {
  return interim.map((n) => {
    const postT = Array.from({ length: n + 1 }, (_, x) => posteriorMixture(priorT, x, n));
    const postC = Array.from({ length: n + 1 }, (_, x) => posteriorMixture(priorC, x, n));
    return postC.map((pc) => Float64Array.from(postT, (pt) => probDifferenceExceeds(pt, pc, delta)));
  });
}

function requireGrid(name: string, g: number[]): void {
  if (!Array.isArray(g) || g.length === 0) throw new StatsDomainError(name, g, "must be a non-empty array of thresholds");
  g.forEach((v) => requireProbability(`${name}[]`, v, { closed: true }));
}

/**
 * Grid search over (thetaT, thetaL[, thetaU]) for a two-arm design (any rule kind). The design
 * supplies priors, rates, margin, nMaxPerArm, looks and rule kind; its thresholds are replaced by
 * the grid values. Grid arrays and their index layout are those of calibrateSingleArm.
 * @throws StatsDomainError for an invalid design, grid, limit or target.
 */
export function calibrateTwoArm(design: TwoArmDesign, options: TwoArmCalibrationOptions): TwoArmCalibrationResult {
  const { priorT, priorC, looks } = validateTwoArmDesign(design);
  const { thetaTGrid, thetaLGrid } = options;
  requireGrid("thetaTGrid", thetaTGrid);
  requireGrid("thetaLGrid", thetaLGrid);
  const useU = design.rule.efficacyStopping;
  const thetaUGrid = useU ? (options.thetaUGrid ?? [design.rule.efficacyThreshold as number]) : null;
  if (thetaUGrid) requireGrid("thetaUGrid", thetaUGrid);
  requireProbability("typeIErrorLimit", options.typeIErrorLimit);
  requireProbability("powerTarget", options.powerTarget);
  const keep = options.keep ?? 5;
  if (!Number.isInteger(keep) || keep < 1) throw new StatsDomainError("keep", keep, "must be a positive integer");

  const N = design.nMaxPerArm;
  const interim = looks.slice(0, -1);
  const K = looks.length;
  const nT = thetaTGrid.length;
  const nL = thetaLGrid.length;
  const nU = thetaUGrid ? thetaUGrid.length : 1;
  const total = nT * nL * nU;
  const typeIError = new Float64Array(total).fill(NaN);
  const power = new Float64Array(total).fill(NaN);
  const enNull = new Float64Array(total).fill(NaN);

  const nullRates = twoArmNullControlRates(design, options.controlRates);
  const nullIndex = nullRates.indexOf(design.controlRate); // -1: the assumed control rate is off the usable boundary
  const increments = (p: number) => looks.map((n, k) => binomialPmfs(n - (k === 0 ? 0 : looks[k - 1]), p));
  const nullIncT = nullRates.map((pC) => increments(onNullBoundary(pC, design.delta)));
  const nullIncC = nullRates.map((pC) => increments(pC));
  const altIncT = increments(design.experimentalRate);
  const altIncC = increments(design.controlRate);
  const predictive = design.rule.kind === "predictive";
  const posteriorStats = predictive ? null : posteriorInterimStatistics(priorT, priorC, design.delta, interim);
  const recursion = new JointRecursion(looks, N);
  const fMax = looks.map((n) => new Int32Array(n + 1));
  const eMin = looks.map((n) => new Int32Array(n + 1));
  const nR = nullRates.length;
  const atNull: Summary[] = new Array(nR);
  /*
   * Exact pruning of the type I error maximum. With thetaT fixed, a higher thetaL only enlarges the
   * futility sets and a higher thetaU only shrinks the efficacy sets, and either way every path that
   * declares success under the new boundaries declares success under the old ones: P(success) at
   * every rate can only fall. So a rate's value at the previous grid point bounds it here, and a
   * rate whose bound is below the largest value computed so far is skipped; the maximum (and where
   * it is first reached) is unchanged. A skipped rate keeps its bound, still an upper bound later.
   */
  const boundsByU = Array.from({ length: nU }, () => new Float64Array(nR).fill(Infinity));
  const boundsPrevU = new Float64Array(nR).fill(Infinity);
  const computed = new Uint8Array(nR);
  const rateOrder = Array.from({ length: nR }, (_, r) => r);

  const feasibleList: TwoArmCalibratedDesign[] = [];
  let evaluated = 0;
  let feasible = 0;
  let cancelled = false;
  let done = 0;

  outer: for (let iT = 0; iT < nT; iT++) {
    const thetaT = thetaTGrid[iT];
    const { finalRule, interimStats } = finalTablesFor(priorT, priorC, design, interim, thetaT, predictive);
    const stats = (interimStats ?? posteriorStats) as Float64Array[][];
    for (const b of boundsByU) b.fill(Infinity);
    for (let xC = 0; xC <= N; xC++) {
      fMax[K - 1][xC] = finalRule.minSuccessT[xC] - 1;
      eMin[K - 1][xC] = finalRule.minSuccessT[xC];
    }
    for (let iL = 0; iL < nL; iL++) {
      const thetaL = thetaLGrid[iL];
      for (let k = 0; k < K - 1; k++) {
        const table = stats[k];
        const row = fMax[k];
        for (let xC = 0; xC < table.length; xC++) {
          const s = table[xC];
          let f = -1;
          for (let x = 0; x < s.length; x++) if (fallsBelowThreshold(s[x], thetaL)) f = x;
          row[xC] = f;
        }
      }
      for (let iU = 0; iU < nU; iU++) {
        done++;
        if (options.shouldCancel?.()) {
          cancelled = true;
          break outer;
        }
        const thetaU = thetaUGrid ? thetaUGrid[iU] : null;
        if (thetaU !== null && !(thetaU > thetaL)) {
          boundsByU[iU].fill(Infinity);
          boundsPrevU.fill(Infinity);
          continue;
        }
        for (let k = 0; k < K - 1; k++) {
          const table = stats[k];
          const row = eMin[k];
          for (let xC = 0; xC < table.length; xC++) {
            const s = table[xC];
            let e = s.length;
            if (thetaU !== null) for (let x = s.length - 1; x >= 0; x--) if (exceedsThreshold(s[x], thetaU)) e = x;
            row[xC] = e;
          }
        }
        const alt = recursion.run(fMax, eMin, altIncT, altIncC);
        // Upper bounds on this point's null-boundary rates, from the previous thetaL (same thetaU) and the previous thetaU (same thetaL).
        const fromL = iL > 0 && thetaL >= thetaLGrid[iL - 1] ? boundsByU[iU] : null;
        const fromU = iU > 0 && thetaU !== null && thetaUGrid && thetaU >= thetaUGrid[iU - 1] ? boundsPrevU : null;
        const bound = boundsByU[iU];
        for (let r = 0; r < nR; r++) {
          const b = Math.min(fromL ? fromL[r] : Infinity, fromU ? fromU[r] : Infinity);
          bound[r] = b;
          computed[r] = 0;
        }
        const order = rateOrder.sort((u, v) => bound[v] - bound[u]);
        let maxAt = -1;
        const visit = (r: number) => {
          atNull[r] = recursion.run(fMax, eMin, nullIncT[r], nullIncC[r]);
          computed[r] = 1;
          bound[r] = atNull[r].declareSuccess;
          const v = atNull[r].declareSuccess;
          if (maxAt < 0 || v > atNull[maxAt].declareSuccess || (v === atNull[maxAt].declareSuccess && r < maxAt)) maxAt = r;
        };
        if (nullIndex >= 0) visit(nullIndex);
        for (const r of order) {
          if (computed[r]) continue;
          // A rate whose bound cannot beat (or tie earlier than) the maximum so far cannot be the first maximum.
          if (maxAt >= 0 && (bound[r] < atNull[maxAt].declareSuccess || (bound[r] === atNull[maxAt].declareSuccess && r > maxAt))) continue;
          visit(r);
        }
        boundsPrevU.set(bound);
        const t1e = atNull[maxAt].declareSuccess;
        const at0 = atNull[nullIndex >= 0 ? nullIndex : maxAt];
        const idx = (iT * nL + iL) * nU + iU;
        typeIError[idx] = t1e;
        power[idx] = alt.declareSuccess;
        enNull[idx] = at0.expectedSampleSize;
        evaluated++;
        if (t1e <= options.typeIErrorLimit && alt.declareSuccess >= options.powerTarget) {
          feasible++;
          feasibleList.push({
            thetaT,
            thetaL,
            thetaU,
            typeIError: t1e,
            typeIErrorMaxAt: { controlRate: nullRates[maxAt], experimentalRate: onNullBoundary(nullRates[maxAt], design.delta) },
            power: alt.declareSuccess,
            expectedSampleSizeNull: at0.expectedSampleSize,
            expectedSampleSizeTarget: alt.expectedSampleSize,
            pEarlyTerminationNull: at0.earlyTermination,
            pEarlyFutilityNull: at0.earlyFutility,
            pEarlyEfficacyNull: at0.earlyEfficacy,
          });
          if (feasibleList.length > 4 * keep) trim(feasibleList, keep);
        }
      }
    }
    options.onProgress?.(done / total);
  }
  trim(feasibleList, keep);
  if (!cancelled) options.onProgress?.(1);
  return {
    grid: { thetaT: thetaTGrid.slice(), thetaL: thetaLGrid.slice(), thetaU: thetaUGrid ? thetaUGrid.slice() : null },
    total,
    evaluated,
    feasible,
    cancelled,
    best: feasibleList,
    typeIError,
    power,
    expectedSampleSizeNull: enNull,
  };
}

/** The order of calibrateSingleArm: smallest expected sample size at the null first, then higher power. */
function trim(list: TwoArmCalibratedDesign[], keep: number): void {
  list.sort((u, v) => u.expectedSampleSizeNull - v.expectedSampleSizeNull || v.power - u.power);
  list.length = Math.min(list.length, keep);
}
