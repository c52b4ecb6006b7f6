/**
 * Threshold search for a two-arm design (equal allocation, per-arm looks): among the grid points
 * whose type I error (the maximum over control rates on the null boundary pT = pC + delta, as in
 * twoArmTypeIErrorAndPower) is at most the limit and whose power at the design's alternative is at
 * least the target, the designs with the smallest expected per-arm sample size at the null point.
 *
 * What depends on what:
 * - the final success table depends on thetaT only: its walk (as twoArmFinalRule) reads the
 *   difference integrals P(pT - pC > delta | xT, xC of N), each evaluated once per call and kept
 *   (FinalProbabilities); the PP tables of all interim looks come from one backward pass
 *   (twoArmPredictiveTablesBackward). Both are built once per distinct final table and cached
 *   across calls, so a job that splits one thetaT into several slices still builds them once, and
 *   thetaT values with the same final table share every grid point's result;
 * - the posterior-probability rules' interim statistic P(pT - pC > delta | xT, xC) depends on no
 *   threshold and is tabulated once per call;
 * - a (thetaL, thetaU) pair only cuts boundaries out of those tables (by bisection: the statistic is
 *   monotone in xT), and the exact recursion over the joint (xT, xC) counts (lib/stats/recursion.ts)
 *   is then run once per rate pair, on the part of the square that is still enrolling.
 * The recursion is the same arithmetic as exactTwoArmOperatingCharacteristics (futility is checked
 * before efficacy at a count both would stop); calibration-two-arm.test.ts checks the best designs
 * against twoArmTypeIErrorAndPower on the chosen thresholds.
 */
import type { MixtureBeta, TwoArmDesign } from "./types";
import { binomialPmfs } from "./distributions";
import { posteriorMixture, requireDelta, type TwoArmFinalRule } from "./predictive";
import { validateTwoArmDesign } from "./decision";
import { probDifferenceExceeds } from "./difference";
import { TWO_ARM_NULL_CONTROL_RATES } from "./operating-characteristics";
import { requireProbability, StatsDomainError } from "./validate";
import { exceedsThreshold } from "./compare";
import { efficacyBottom, futilityTop, JointRecursion, type RecursionSummary } from "./recursion";
import { twoArmPredictiveTablesBackward } from "./backward";
import { monotoneThresholds } from "./predictive";
import { trimBest, type CalibratedDesign, type CalibrationOptions, type CalibrationResult } from "./calibration";

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

type Summary = RecursionSummary;
type PointResult = { t1e: number; maxAt: number; alt: Summary; at0: Summary };

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

/** Per distinct final success table: the final boundary and (predictive rule) the interim PP tables. */
type FinalTables = { key: string; finalRule: TwoArmFinalRule; interimStats: Float64Array[][] | null };
const finalTablesCache = new Map<string, FinalTables>();

/**
 * P(pT - pC > delta | xT, xC of N per arm), evaluated on demand and kept: the final tables of the
 * thetaT values of one search walk nearby cells, and each cell is one difference integral.
 */
class FinalProbabilities {
  private readonly values: Float64Array;
  private readonly postT: MixtureBeta[];
  private readonly postC: MixtureBeta[];
  constructor(
    priorT: MixtureBeta,
    priorC: MixtureBeta,
    private readonly N: number,
    private readonly delta: number,
  ) {
    requireDelta(delta);
    this.values = new Float64Array((N + 1) * (N + 1)).fill(NaN);
    this.postT = Array.from({ length: N + 1 }, (_, x) => posteriorMixture(priorT, x, N));
    this.postC = Array.from({ length: N + 1 }, (_, x) => posteriorMixture(priorC, x, N));
  }
  at(xT: number, xC: number): number {
    const i = xC * (this.N + 1) + xT;
    let v = this.values[i];
    if (Number.isNaN(v)) this.values[i] = v = probDifferenceExceeds(this.postT[xT], this.postC[xC], this.delta);
    return v;
  }
  /** The final rule at thetaT: the walk of twoArmFinalRule on the kept probabilities (same values, same table). */
  rule(thetaT: number): TwoArmFinalRule {
    requireProbability("thetaT", thetaT, { closed: true });
    const minSuccessT = monotoneThresholds(this.N, this.N, (xT, xC) => exceedsThreshold(this.at(xT, xC), thetaT));
    return { nMaxPerArm: this.N, delta: this.delta, thetaT, minSuccessT };
  }
}

function finalTablesFor(priorT: MixtureBeta, priorC: MixtureBeta, design: TwoArmDesign, interim: number[], finalRule: TwoArmFinalRule, predictive: boolean): FinalTables {
  const key = JSON.stringify([priorT, priorC, design.nMaxPerArm, design.delta, interim, predictive, Array.from(finalRule.minSuccessT)]);
  const hit = finalTablesCache.get(key);
  if (hit) return hit;
  const tables: FinalTables = {
    key,
    finalRule,
    // Every interim look's PP table in one backward pass.
    interimStats: predictive ? twoArmPredictiveTablesBackward(priorT, priorC, interim, design.nMaxPerArm, finalRule.minSuccessT) : null,
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
  /*
   * The same holds along thetaT: a higher thetaT shrinks the final success set, so every PP (an
   * average of final success indicators) can only fall, the futility sets grow and the efficacy
   * sets shrink. So the values at the previous thetaT (same thetaL, thetaU) bound this point too.
   * boundsByT[slot] holds them; boundsTFor is the thetaT they were computed at (NaN: none).
   */
  const boundsByT = Array.from({ length: nL * nU }, () => new Float64Array(nR).fill(Infinity));
  const boundsTFor = new Float64Array(nL * nU).fill(NaN);
  const computed = new Uint8Array(nR);
  const rateOrder = Array.from({ length: nR }, (_, r) => r);

  /** One grid point on the boundaries in fMax / eMin (futility rows already cut for thetaL). */
  const searchPoint = (thetaT: number, iL: number, iU: number, thetaL: number, thetaU: number | null): PointResult => {
    for (let k = 0; k < K - 1; k++) {
      const table = stats[k];
      const row = eMin[k];
      for (let xC = 0; xC < table.length; xC++) row[xC] = thetaU !== null ? efficacyBottom(table[xC], thetaU) : table[xC].length;
    }
    const alt = recursion.run(fMax, eMin, altIncT, altIncC, false);
    // Upper bounds on this point's null-boundary rates, from the previous thetaL (same thetaU) and the previous thetaU (same thetaL).
    const fromL = iL > 0 && thetaL >= thetaLGrid[iL - 1] ? boundsByU[iU] : null;
    const fromU = iU > 0 && thetaU !== null && thetaUGrid && thetaU >= thetaUGrid[iU - 1] ? boundsPrevU : null;
    const slot = iL * nU + iU;
    const fromT = thetaT >= boundsTFor[slot] ? boundsByT[slot] : null;
    const bound = boundsByU[iU];
    for (let r = 0; r < nR; r++) {
      const b = Math.min(fromL ? fromL[r] : Infinity, fromU ? fromU[r] : Infinity, fromT ? fromT[r] : Infinity);
      bound[r] = b;
      computed[r] = 0;
    }
    const order = rateOrder.sort((u, v) => bound[v] - bound[u]);
    let maxAt = -1;
    const visit = (r: number) => {
      atNull[r] = recursion.run(fMax, eMin, nullIncT[r], nullIncC[r], false);
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
    boundsByT[slot].set(bound);
    boundsTFor[slot] = thetaT;
    return { t1e: atNull[maxAt].declareSuccess, maxAt, alt, at0: atNull[nullIndex >= 0 ? nullIndex : maxAt] };
  };
  let stats: Float64Array[][] = [];
  const resultsByTable = new Map<string, (PointResult | undefined)[]>();
  const finalProbabilities = new FinalProbabilities(priorT, priorC, N, design.delta);

  const feasibleList: TwoArmCalibratedDesign[] = [];
  let evaluated = 0;
  let feasible = 0;
  let cancelled = false;
  let done = 0;

  outer: for (let iT = 0; iT < nT; iT++) {
    const thetaT = thetaTGrid[iT];
    const { key, finalRule, interimStats } = finalTablesFor(priorT, priorC, design, interim, finalProbabilities.rule(thetaT), predictive);
    stats = (interimStats ?? posteriorStats) as Float64Array[][];
    // thetaT values with the same final table have the same boundaries at every (thetaL, thetaU),
    // hence exactly the same results: computed once per table.
    let shared = resultsByTable.get(key);
    if (!shared) resultsByTable.set(key, (shared = new Array(nL * nU)));
    for (const b of boundsByU) b.fill(Infinity);
    for (let xC = 0; xC <= N; xC++) {
      fMax[K - 1][xC] = finalRule.minSuccessT[xC] - 1;
      eMin[K - 1][xC] = finalRule.minSuccessT[xC];
    }
    for (let iL = 0; iL < nL; iL++) {
      const thetaL = thetaLGrid[iL];
      let haveFutility = false;
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
          boundsTFor[iL * nU + iU] = NaN;
          continue;
        }
        const slot = iL * nU + iU;
        let result = shared[slot];
        if (!result) {
          if (!haveFutility) {
            for (let k = 0; k < K - 1; k++) {
              const table = stats[k];
              const row = fMax[k];
              // The statistic is non-decreasing in xT at each xC, so the futility set is a lower set.
              for (let xC = 0; xC < table.length; xC++) row[xC] = futilityTop(table[xC], thetaL);
            }
            haveFutility = true;
          }
          result = shared[slot] = searchPoint(thetaT, iL, iU, thetaL, thetaU);
        }
        const { t1e, maxAt, alt, at0 } = result;
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
          if (feasibleList.length > 4 * keep) trimBest(feasibleList, keep);
        }
      }
    }
    options.onProgress?.(done / total);
  }
  trimBest(feasibleList, keep);
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

