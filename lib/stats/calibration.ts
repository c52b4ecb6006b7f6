/**
 * Calibration of a single-arm design's thresholds by grid search: among the grid points whose
 * exact type I error (at p0) is at most the limit and exact power (at p1) at least the target,
 * the designs with the smallest expected sample size under p0.
 *
 * Speed comes from what depends on what: the final success set, and hence the PP table, depends
 * on thetaT only, and many thetaT values share a success set (built once per distinct set, by the
 * backward recursion in O(nMax^2)); a (thetaL, thetaU) pair only reads boundaries off that table
 * (by bisection: the statistic is monotone in the count), and the exact forward recursion
 * (lib/stats/recursion.ts) costs O(looks * nMax) per rate on the counts still enrolling.
 */
import type { SingleArmDesign } from "./types";
import { binomialPmfs } from "./distributions";
import { mixtureSurvival } from "./priors";
import { posteriorMixture, singleArmPredictiveTable } from "./predictive";
import { validateSingleArmDesign } from "./decision";
import { singleArmInterimStatistics } from "./boundaries";
import { requireProbability, StatsDomainError } from "./validate";
import { exceedsThreshold } from "./compare";
import { efficacyBottom, futilityTop, singleArmForward, type RecursionSummary } from "./recursion";

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
  const fMax = new Int32Array(K);
  const eMin = new Int32Array(K);
  const statsBySuccess = new Map<number, Float64Array[]>();
  const resultsBySuccess = new Map<number, ([RecursionSummary, RecursionSummary] | undefined)[]>();

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
    let shared = resultsBySuccess.get(successMin);
    if (!shared) resultsBySuccess.set(successMin, (shared = new Array(nL * nU)));
    fMax[K - 1] = successMin - 1;
    eMin[K - 1] = successMin;
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
        if (thetaU !== null && !(thetaU > thetaL)) continue;
        // thetaT values that share a success set share the PP table, hence every boundary and the
        // recursion's result, exactly.
        const slot = iL * nU + iU;
        let both = shared[slot];
        if (!both) {
          if (!haveFutility) {
            for (let k = 0; k < K - 1; k++) fMax[k] = futilityTop((stats as Float64Array[])[k], thetaL);
            haveFutility = true;
          }
          for (let k = 0; k < K - 1; k++) {
            const s = (stats as Float64Array[])[k];
            const e = thetaU !== null ? efficacyBottom(s, thetaU) : s.length;
            // A count cannot both stop for futility and efficacy; thetaU > thetaL guarantees it for monotone statistics.
            eMin[k] = e <= fMax[k] ? fMax[k] + 1 : e;
          }
          both = [singleArmForward(looks, fMax, eMin, inc0, bufA, null), singleArmForward(looks, fMax, eMin, inc1, bufA, null)];
          shared[slot] = both;
        }
        const [at0, at1] = both;
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

/**
 * Keeps the `keep` best feasible designs, in the order the searches report them (one arm and two):
 * smallest expected sample size at the null first, then higher power.
 */
export function trimBest<D extends { expectedSampleSizeNull: number; power: number }>(list: D[], keep: number): void {
  list.sort((u, v) => u.expectedSampleSizeNull - v.expectedSampleSizeNull || v.power - u.power);
  list.length = Math.min(list.length, keep);
}
