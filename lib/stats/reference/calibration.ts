// Reference implementation, kept unchanged (import paths only) to check the fast paths in lib/stats against.
/**
 * Calibration of a single-arm design's thresholds by grid search: among the grid points whose
 * exact type I error (at p0) is at most the limit and exact power (at p1) at least the target,
 * the designs with the smallest expected sample size under p0.
 *
 * Speed comes from what depends on what: the final success set, and hence the PP table, depends
 * on thetaT only, and many thetaT values share a success set (built once per distinct set); a
 * (thetaL, thetaU) pair only reads boundaries off that table, and the exact recursion costs
 * O(looks * nMax) per rate.
 */
import type { SingleArmDesign } from "../types";
import { binomialPmfs } from "../distributions";
import { mixtureSurvival } from "../priors";
import { posteriorMixture, singleArmPredictiveTable } from "./predictive";
import { validateSingleArmDesign } from "../decision";
import { singleArmInterimStatistics } from "./boundaries";
import { requireProbability, StatsDomainError } from "../validate";
import { exceedsThreshold, fallsBelowThreshold } from "../compare";

export type CalibrationOptions = {
  /** Final success thresholds to try, each in [0, 1]. */
  thetaTGrid: number[];
  /** Futility thresholds to try (PP for the predictive rule, pL for the posterior rule), each in [0, 1]. */
  thetaLGrid: number[];
  /**
   * Efficacy thresholds to try, each in [0, 1]; only when the design's efficacy stopping is on.
   * Omitted: the design's own efficacy threshold is kept. Pairs with thetaU <= thetaL are skipped.
   */
  thetaUGrid?: number[] | null;
  /** Largest acceptable type I error, in (0, 1). */
  typeIErrorLimit: number;
  /** Smallest acceptable power, in (0, 1). */
  powerTarget: number;
  /** How many of the best designs to return (default 5). */
  keep?: number;
  /** Called with the fraction of the grid done, in [0, 1]. */
  onProgress?: (fraction: number) => void;
  /** Polled between grid points; returning true stops the search with what has been found. */
  shouldCancel?: () => boolean;
};

export type CalibratedDesign = {
  thetaT: number;
  thetaL: number;
  thetaU: number | null;
  typeIError: number;
  power: number;
  expectedSampleSizeNull: number;
  expectedSampleSizeTarget: number;
  pEarlyTerminationNull: number;
  /** Early termination under p0 split by reason: futility stops and efficacy stops before nMax. */
  pEarlyFutilityNull: number;
  pEarlyEfficacyNull: number;
};

export type CalibrationResult = {
  grid: { thetaT: number[]; thetaL: number[]; thetaU: number[] | null };
  /** Grid points in the full search (skipped thetaU <= thetaL pairs included). */
  total: number;
  evaluated: number;
  feasible: number;
  cancelled: boolean;
  /** Feasible designs, smallest expected sample size under p0 first (ties: higher power first). */
  best: CalibratedDesign[];
  /**
   * Per grid point, index (iT * nL + iL) * nU + iU (nU = 1 without a thetaU grid); NaN where not
   * evaluated. For heat maps of the searched grid.
   */
  typeIError: Float64Array;
  power: Float64Array;
  expectedSampleSizeNull: Float64Array;
};

type Summary = { declareSuccess: number; expectedSampleSize: number; earlyTermination: number; earlyFutility: number; earlyEfficacy: number };

/**
 * Exact single-arm recursion on integer bounds (fMax = -1: none; eMin = n + 1: none), with the
 * binomial increments between looks precomputed. Same arithmetic as exactOperatingCharacteristics.
 */
function recurse(looks: number[], fMax: Int32Array, eMin: Int32Array, incs: Float64Array[], a: Float64Array, b: Float64Array): Summary {
  a[0] = 1;
  let cur = a;
  let nxt = b;
  // Mass lives on [lo, hi]; boundaries remove the ends, so the support stays narrow.
  let lo = 0;
  let hi = 0;
  let early = 0;
  let earlyFut = 0;
  let earlyEff = 0;
  let eff = 0;
  let en = 0;
  const last = looks.length - 1;
  for (let k = 0; k <= last; k++) {
    const n = looks[k];
    const inc = incs[k];
    const gap = inc.length - 1;
    const nlo = lo;
    const nhi = hi + gap;
    nxt.fill(0, nlo, nhi + 1);
    for (let x = lo; x <= hi; x++) {
      const w = cur[x];
      if (w === 0) continue;
      for (let y = 0; y <= gap; y++) nxt[x + y] += w * inc[y];
    }
    const t = cur;
    cur = nxt;
    nxt = t;
    lo = nlo;
    hi = nhi;
    const f = fMax[k];
    const e = eMin[k];
    let fut = 0;
    let ef = 0;
    for (let x = lo; x <= f && x <= hi; x++) fut += cur[x];
    for (let x = e < lo ? lo : e; x <= hi; x++) ef += cur[x];
    if (f + 1 > lo) lo = f + 1;
    if (e - 1 < hi) hi = e - 1;
    if (k < last) {
      early += fut + ef;
      earlyFut += fut;
      earlyEff += ef;
      eff += ef;
      en += n * (fut + ef);
    } else {
      let rest = 0;
      for (let x = lo; x <= hi; x++) rest += cur[x];
      en += n * (fut + ef + rest);
      eff += ef;
    }
    if (lo > hi) {
      // Every trial has stopped.
      return { declareSuccess: eff, expectedSampleSize: en, earlyTermination: early, earlyFutility: earlyFut, earlyEfficacy: earlyEff };
    }
  }
  return { declareSuccess: eff, expectedSampleSize: en, earlyTermination: early, earlyFutility: earlyFut, earlyEfficacy: earlyEff };
}

function requireGrid(name: string, g: number[]): void {
  if (!Array.isArray(g) || g.length === 0) throw new StatsDomainError(name, g, "must be a non-empty array of thresholds");
  g.forEach((v) => requireProbability(`${name}[]`, v, { closed: true }));
}

/**
 * Grid search over (thetaT, thetaL[, thetaU]) for a single-arm design (predictive or posterior rule).
 * The design supplies prior, p0, p1, nMax, looks and the rule kind; its thresholds are replaced by
 * the grid values.
 * @throws StatsDomainError for an invalid design, grid, limit or target.
 */
export function calibrateSingleArm(design: SingleArmDesign, options: CalibrationOptions): CalibrationResult {
  const { prior, looks } = validateSingleArmDesign(design);
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

  const nMax = design.nMax;
  const interim = looks.slice(0, -1);
  const K = looks.length;
  const nT = thetaTGrid.length;
  const nL = thetaLGrid.length;
  const nU = thetaUGrid ? thetaUGrid.length : 1;
  const total = nT * nL * nU;
  const typeIError = new Float64Array(total).fill(NaN);
  const power = new Float64Array(total).fill(NaN);
  const enNull = new Float64Array(total).fill(NaN);

  // Threshold-free pieces.
  const finalProb = new Float64Array(nMax + 1);
  for (let x = 0; x <= nMax; x++) finalProb[x] = mixtureSurvival(posteriorMixture(prior, x, nMax), design.p0);
  const predictive = design.rule.kind === "predictive";
  const posteriorStats = predictive ? null : singleArmInterimStatistics(prior, design, interim, new Uint8Array(nMax + 1));
  const incs = (p: number) => looks.map((n, k) => binomialPmfs(n - (k === 0 ? 0 : looks[k - 1]), p));
  const inc0 = incs(design.p0);
  const inc1 = incs(design.p1);
  const bufA = new Float64Array(nMax + 1);
  const bufB = new Float64Array(nMax + 1);
  const fMax = new Int32Array(K);
  const eMin = new Int32Array(K);
  const statsBySuccess = new Map<number, Float64Array[]>();

  const feasibleList: CalibratedDesign[] = [];
  let evaluated = 0;
  let feasible = 0;
  let cancelled = false;
  let done = 0;

  outer: for (let iT = 0; iT < nT; iT++) {
    const thetaT = thetaTGrid[iT];
    const success = new Uint8Array(nMax + 1);
    let successMin = nMax + 1;
    for (let x = nMax; x >= 0; x--)
      if (exceedsThreshold(finalProb[x], thetaT)) {
        success[x] = 1;
        successMin = x;
      }
    let stats = posteriorStats;
    if (predictive) {
      // The success set is an upper set of counts, so its smallest member identifies it.
      stats = statsBySuccess.get(successMin) ?? null;
      if (!stats) {
        stats = singleArmPredictiveTable(prior, interim, nMax, success);
        statsBySuccess.set(successMin, stats);
      }
    }
    fMax[K - 1] = successMin - 1;
    eMin[K - 1] = successMin;
    for (let iL = 0; iL < nL; iL++) {
      const thetaL = thetaLGrid[iL];
      for (let k = 0; k < K - 1; k++) {
        const s = (stats as Float64Array[])[k];
        let f = -1;
        for (let x = 0; x < s.length; x++) if (fallsBelowThreshold(s[x], thetaL)) f = x;
        fMax[k] = f;
      }
      for (let iU = 0; iU < nU; iU++) {
        done++;
        if (options.shouldCancel?.()) {
          cancelled = true;
          break outer;
        }
        const thetaU = thetaUGrid ? thetaUGrid[iU] : null;
        if (thetaU !== null && !(thetaU > thetaL)) continue;
        for (let k = 0; k < K - 1; k++) {
          const s = (stats as Float64Array[])[k];
          let e = s.length;
          if (thetaU !== null) for (let x = s.length - 1; x >= 0; x--) if (exceedsThreshold(s[x], thetaU)) e = x;
          // A count cannot both stop for futility and efficacy; thetaU > thetaL guarantees it for monotone statistics.
          eMin[k] = e <= fMax[k] ? fMax[k] + 1 : e;
        }
        const at0 = recurse(looks, fMax, eMin, inc0, bufA, bufB);
        const at1 = recurse(looks, fMax, eMin, inc1, bufA, bufB);
        const idx = (iT * nL + iL) * nU + iU;
        typeIError[idx] = at0.declareSuccess;
        power[idx] = at1.declareSuccess;
        enNull[idx] = at0.expectedSampleSize;
        evaluated++;
        if (at0.declareSuccess <= options.typeIErrorLimit && at1.declareSuccess >= options.powerTarget) {
          feasible++;
          feasibleList.push({
            thetaT,
            thetaL,
            thetaU,
            typeIError: at0.declareSuccess,
            power: at1.declareSuccess,
            expectedSampleSizeNull: at0.expectedSampleSize,
            expectedSampleSizeTarget: at1.expectedSampleSize,
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

function trim(list: CalibratedDesign[], keep: number): void {
  list.sort((u, v) => u.expectedSampleSizeNull - v.expectedSampleSizeNull || v.power - u.power);
  list.length = Math.min(list.length, keep);
}
