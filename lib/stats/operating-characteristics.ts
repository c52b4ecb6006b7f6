/**
 * Operating characteristics computed exactly by forward recursion over the binomial increments
 * between looks (not by simulation). The state after each look is the distribution of the
 * cumulative responder count among trials still running; mass that crosses a boundary is booked
 * as a stop at that look and removed.
 *
 * The recursion runs on a boundary table, so any rule that can be written as one (a Bayesian
 * design via `singleArmBoundaries`, or a frequentist two-stage design) gets the same treatment.
 *
 * Conventions: early termination is any stop before nMax; P(declare success) counts success at the
 * final analysis plus early efficacy stops; sample size is the number of patients at the stop.
 */
import type { Design, SingleArmDesign, TwoArmDesign } from "./types";
import { expandLooks } from "./looks";
import { binomialPmfs } from "./distributions";
import {
  safetyBoundaries,
  singleArmBoundaries,
  twoArmBoundaries,
  validateResponseBoundary,
  type ResponseBoundary,
  type SafetyBoundary,
  type TwoArmBoundary,
} from "./boundaries";
import { requireCount, requireFinite, requireProbability, StatsDomainError } from "./validate";
import { JointRecursion, lookArrays, singleArmForward } from "./recursion";

export type LookOutcome = {
  n: number;
  /** P(the trial stops for futility at this look); at the final look: P(no success). */
  pStopFutility: number;
  /** P(the trial stops for efficacy at this look); at the final look: P(success). */
  pStopEfficacy: number;
  /** P(the trial is still running after this look) (0 at the final look). */
  pContinue: number;
};

export type OperatingCharacteristics = {
  /** True response rate (single arm) the characteristics are computed at. */
  p: number;
  looks: LookOutcome[];
  pEarlyFutility: number;
  pEarlyEfficacy: number;
  /** P(any stop before nMax). */
  pEarlyTermination: number;
  pSuccessAtEnd: number;
  pNoSuccessAtEnd: number;
  /** P(success at the end) + P(early efficacy stop): type I error at p0, power at p1. */
  pDeclareSuccess: number;
  expectedSampleSize: number;
  /** P(N = n) at each look size. */
  sampleSizeDistribution: { n: number; probability: number }[];
};

/** Cumulative distribution carried between looks, and the binomial increments it is convolved with. */
function convolve(dist: Float64Array, inc: Float64Array): Float64Array {
  const out = new Float64Array(dist.length + inc.length - 1);
  for (let x = 0; x < dist.length; x++) {
    const w = dist[x];
    if (w === 0) continue;
    for (let y = 0; y < inc.length; y++) out[x + y] += w * inc[y];
  }
  return out;
}

function validateBoundaries(boundaries: ResponseBoundary[]): void {
  if (!Array.isArray(boundaries) || boundaries.length === 0)
    throw new StatsDomainError("boundaries", boundaries, "must be a non-empty array of looks");
  let prev = 0;
  boundaries.forEach((b, k) => {
    validateResponseBoundary(b, prev);
    prev = b.n;
    const last = k === boundaries.length - 1;
    if (b.final !== last) throw new StatsDomainError("boundary.final", b.final, "must be true for the last look only");
  });
}

/**
 * Exact single-arm operating characteristics of a boundary table at true response rate p.
 *
 * @param boundaries - looks in increasing n; the last is the final analysis (final: true), where
 *   counts >= efficacyMin are success (null: no count succeeds)
 * @param p - true response rate, 0 <= p <= 1
 */
export function exactOperatingCharacteristics(boundaries: ResponseBoundary[], p: number): OperatingCharacteristics {
  validateBoundaries(boundaries);
  requireProbability("p", p, { closed: true });
  const K = boundaries.length;
  const sizes = new Array<number>(K);
  const fMax = new Int32Array(K);
  const eMin = new Int32Array(K);
  const incs: Float64Array[] = new Array(K);
  const incCache = new Map<number, Float64Array>();
  let prev = 0;
  boundaries.forEach((b, k) => {
    sizes[k] = b.n;
    fMax[k] = b.futilityMax ?? -1;
    eMin[k] = b.efficacyMin ?? b.n + 1;
    const gap = b.n - prev;
    let inc = incCache.get(gap);
    if (!inc) incCache.set(gap, (inc = binomialPmfs(gap, p)));
    incs[k] = inc;
    prev = b.n;
  });
  const out = lookArrays(K);
  singleArmForward(sizes, fMax, eMin, incs, new Float64Array(prev + 1), out);
  const looks: LookOutcome[] = sizes.map((n, k) => ({ n, pStopFutility: out.fut[k], pStopEfficacy: out.eff[k], pContinue: out.cont[k] }));
  return { p, ...summariseLooks(looks) };
}

/** Exact operating characteristics of a single-arm design at true rate p (0 <= p <= 1). */
export function singleArmOperatingCharacteristics(design: SingleArmDesign, p: number): OperatingCharacteristics {
  return exactOperatingCharacteristics(singleArmBoundaries(design).response, p);
}

/** Operating characteristics over a curve of true rates, computing the boundaries once. */
export function operatingCharacteristicsCurve(design: SingleArmDesign, rates: number[]): OperatingCharacteristics[] {
  if (!Array.isArray(rates)) throw new StatsDomainError("rates", rates, "must be an array of rates");
  const b = singleArmBoundaries(design).response;
  return rates.map((p) => exactOperatingCharacteristics(b, p));
}

/** Type I error at p0 and power at p1 of a single-arm design (both count early efficacy stops). */
export function typeIErrorAndPower(design: SingleArmDesign): {
  typeIError: number;
  power: number;
  atNull: OperatingCharacteristics;
  atTarget: OperatingCharacteristics;
} {
  const b = singleArmBoundaries(design).response;
  const atNull = exactOperatingCharacteristics(b, design.p0);
  const atTarget = exactOperatingCharacteristics(b, design.p1);
  return { typeIError: atNull.pDeclareSuccess, power: atTarget.pDeclareSuccess, atNull, atTarget };
}

// ---------------------------------------------------------------------------------------------
// Safety-only characteristics
// ---------------------------------------------------------------------------------------------

export type SafetyOperatingCharacteristics = {
  /** True toxicity rate. */
  q: number;
  /** P(the first safety stop is at this look); the final look counts a flag at the final analysis. */
  looks: { n: number; pSafetyStop: number }[];
  /** P(a safety stop at any look, final included). */
  pSafetyStop: number;
  /** P(a safety stop before nMax). */
  pEarlySafetyStop: number;
  /** Expected patients enrolled when safety monitoring alone decides when to stop. */
  expectedSampleSize: number;
};

/**
 * Exact probability of a safety stop by look at true toxicity rate q, with safety monitoring alone
 * (no response-based stopping), so no assumption about the joint law of toxicity and response.
 * @param boundaries - from `safetyBoundaries`, looks in increasing n
 * @param q - true toxicity rate, 0 <= q <= 1
 */
export function exactSafetyOperatingCharacteristics(boundaries: SafetyBoundary[], q: number): SafetyOperatingCharacteristics {
  if (!Array.isArray(boundaries) || boundaries.length === 0)
    throw new StatsDomainError("boundaries", boundaries, "must be a non-empty array of looks");
  requireProbability("q", q, { closed: true });
  let dist: Float64Array = new Float64Array([1]);
  let prev = 0;
  const looks: { n: number; pSafetyStop: number }[] = [];
  let expected = 0;
  boundaries.forEach((b, k) => {
    requireCount("boundary.n", b.n);
    if (b.n <= prev && !(k === 0 && b.n > 0)) throw new StatsDomainError("boundary.n", b.n, `must exceed the previous look ${prev}`);
    if (b.toxicityMin !== null) {
      requireCount("boundary.toxicityMin", b.toxicityMin);
      if (b.toxicityMin > b.n) throw new StatsDomainError("boundary.toxicityMin", b.toxicityMin, `must not exceed n = ${b.n}`);
    }
    dist = convolve(dist, binomialPmfs(b.n - prev, q));
    prev = b.n;
    let stop = 0;
    if (b.toxicityMin !== null)
      for (let t = b.toxicityMin; t <= b.n; t++) {
        stop += dist[t];
        dist[t] = 0;
      }
    looks.push({ n: b.n, pSafetyStop: stop });
    expected += b.n * stop;
  });
  const remaining = dist.reduce((s, v) => s + v, 0);
  const nMax = boundaries[boundaries.length - 1].n;
  expected += nMax * remaining;
  const pSafetyStop = looks.reduce((s, l) => s + l.pSafetyStop, 0);
  return { q, looks, pSafetyStop, pEarlySafetyStop: pSafetyStop - looks[looks.length - 1].pSafetyStop, expectedSampleSize: expected };
}

// ---------------------------------------------------------------------------------------------
// Two arms
// ---------------------------------------------------------------------------------------------

export type TwoArmOperatingCharacteristics = Omit<OperatingCharacteristics, "p"> & { pT: number; pC: number };

/**
 * Exact two-arm operating characteristics at true rates (pT, pC), by forward recursion over the
 * joint (xT, xC) state with equal per-arm looks (lib/stats/recursion.ts, on the counts still
 * enrolling). Sample sizes are per arm.
 * @param boundaries - from `twoArmBoundaries`: per look, per control count, the bounds on xT
 * @param pT, pC - true rates, each in [0, 1]
 */
export function exactTwoArmOperatingCharacteristics(boundaries: TwoArmBoundary[], pT: number, pC: number): TwoArmOperatingCharacteristics {
  if (!Array.isArray(boundaries) || boundaries.length === 0)
    throw new StatsDomainError("boundaries", boundaries, "must be a non-empty array of looks");
  requireProbability("pT", pT, { closed: true });
  requireProbability("pC", pC, { closed: true });
  const K = boundaries.length;
  const sizes = new Array<number>(K);
  const fMax: Int32Array[] = new Array(K);
  const eMin: Int32Array[] = new Array(K);
  const incT: Float64Array[] = new Array(K);
  const incC: Float64Array[] = new Array(K);
  let prev = 0;
  boundaries.forEach((b, k) => {
    requireCount("boundary.n", b.n);
    if (b.n <= prev) throw new StatsDomainError("boundary.n", b.n, `must exceed the previous look ${prev}`);
    if (b.final !== (k === boundaries.length - 1)) throw new StatsDomainError("boundary.final", b.final, "must be true for the last look only");
    if (b.futilityMaxT.length !== b.n + 1 || b.efficacyMinT.length !== b.n + 1)
      throw new StatsDomainError("boundary.futilityMaxT", b.futilityMaxT.length, `must have one entry per control count 0..${b.n}`);
    sizes[k] = b.n;
    fMax[k] = Int32Array.from(b.futilityMaxT, (v) => v ?? -1);
    eMin[k] = Int32Array.from(b.efficacyMinT, (v) => v ?? b.n + 1);
    incT[k] = binomialPmfs(b.n - prev, pT);
    incC[k] = binomialPmfs(b.n - prev, pC);
    prev = b.n;
  });
  const recursion = new JointRecursion(sizes, prev);
  recursion.run(fMax, eMin, incT, incC);
  const out = recursion.out;
  const looks: LookOutcome[] = sizes.map((n, k) => ({ n, pStopFutility: out.fut[k], pStopEfficacy: out.eff[k], pContinue: out.cont[k] }));
  return { pT, pC, ...summariseLooks(looks) };
}

/** Exact two-arm operating characteristics of a design at (pT, pC). */
export function twoArmOperatingCharacteristics(design: TwoArmDesign, pT: number, pC: number): TwoArmOperatingCharacteristics {
  return exactTwoArmOperatingCharacteristics(twoArmBoundaries(design).response, pT, pC);
}

/** Two-arm operating characteristics over a curve of (pT, pC) pairs, computing the boundaries once. */
export function twoArmOperatingCharacteristicsCurve(design: TwoArmDesign, pairs: [number, number][]): TwoArmOperatingCharacteristics[] {
  if (!Array.isArray(pairs)) throw new StatsDomainError("pairs", pairs, "must be an array of [pT, pC] pairs");
  const b = twoArmBoundaries(design).response;
  return pairs.map(([pT, pC]) => exactTwoArmOperatingCharacteristics(b, pT, pC));
}

/** Default control rates for the two-arm type I error curve: 0.05, 0.10, ..., 0.95. */
export const TWO_ARM_NULL_CONTROL_RATES: readonly number[] = Array.from({ length: 19 }, (_, i) => Math.round((i + 1) * 5) / 100);

/** One point of the null boundary pT = pC + delta with the probability of declaring success there. */
export type TwoArmNullPoint = { controlRate: number; experimentalRate: number; typeIError: number };

export type TwoArmErrorRates = {
  delta: number;
  /**
   * Type I error along the boundary of the null hypothesis pT - pC <= delta, i.e. at pT = pC + delta
   * (not at pT = pC unless delta = 0), one point per control rate whose pair lies inside (0, 1).
   */
  nullCurve: TwoArmNullPoint[];
  /** The largest type I error on `nullCurve` (the design's reported type I error). */
  typeIError: number;
  /** Where the largest type I error occurs (the first such point if several tie). */
  typeIErrorMaxAt: { controlRate: number; experimentalRate: number };
  /** Smallest and largest control rate on `nullCurve`. */
  controlRateRange: { from: number; to: number };
  /** Type I error at the design's assumed control rate (pT = controlRate + delta); null when that pair leaves (0, 1). */
  typeIErrorAtControlRate: number | null;
  /** The null-boundary pair `atNull` is computed at: the assumed control rate if usable, else the maximising pair. */
  nullPoint: { controlRate: number; experimentalRate: number };
  atNull: TwoArmOperatingCharacteristics;
  /** P(declare success) at the design's alternative (experimentalRate, controlRate). */
  power: number;
  atTarget: TwoArmOperatingCharacteristics;
};

/** pC + delta without binary noise (0.3 - 0.1 is 0.2, not 0.19999999999999998), so labels and grids line up. */
function onNullBoundary(pC: number, delta: number): number {
  return Math.round((pC + delta) * 1e12) / 1e12;
}

const insideUnit = (p: number) => p > 0 && p < 1;

/**
 * Two-arm type I error and power of a boundary table.
 *
 * The null hypothesis of a two-arm design with margin delta is pT - pC <= delta, so the type I
 * error belongs on its boundary pT = pC + delta (product brief, "Conventions"; for
 * non-inferiority designs the error rate is evaluated at the margin, as in the US FDA guidance
 * "Non-Inferiority Clinical Trials to Establish Effectiveness", 2016). The boundary is a line, not
 * a point, so the error is reported over a range of control rates with its maximum. Pairs with
 * pC or pC + delta outside the open interval (0, 1) are skipped; if none remains, the midpoint of
 * the admissible control rates is used, so the curve is never empty.
 *
 * @param boundaries - the design's response boundaries (`twoArmBoundaries(design).response`)
 * @param design - supplies delta, controlRate and experimentalRate
 * @param controlRates - control rates in (0, 1) for the curve (default TWO_ARM_NULL_CONTROL_RATES); the assumed control rate is always added
 */
export function twoArmErrorRatesFromBoundaries(
  boundaries: TwoArmBoundary[],
  design: Pick<TwoArmDesign, "delta" | "controlRate" | "experimentalRate">,
  controlRates: readonly number[] = TWO_ARM_NULL_CONTROL_RATES,
): TwoArmErrorRates {
  const { delta, controlRate, experimentalRate } = design;
  requireFinite("delta", delta);
  if (!(delta > -1 && delta < 1)) throw new StatsDomainError("delta", delta, "must lie strictly between -1 and 1");
  requireProbability("controlRate", controlRate);
  requireProbability("experimentalRate", experimentalRate);
  if (!Array.isArray(controlRates)) throw new StatsDomainError("controlRates", controlRates, "must be an array of rates in (0, 1)");
  controlRates.forEach((r, i) => requireProbability(`controlRates[${i}]`, r));
  let rates = [...new Set([...controlRates, controlRate])].filter((pC) => insideUnit(onNullBoundary(pC, delta))).sort((u, v) => u - v);
  if (rates.length === 0) rates = [(Math.max(0, -delta) + Math.min(1, 1 - delta)) / 2];
  const ocs = new Map<number, TwoArmOperatingCharacteristics>();
  const nullCurve = rates.map((pC) => {
    const pT = onNullBoundary(pC, delta);
    const oc = exactTwoArmOperatingCharacteristics(boundaries, pT, pC);
    ocs.set(pC, oc);
    return { controlRate: pC, experimentalRate: pT, typeIError: oc.pDeclareSuccess };
  });
  let max = nullCurve[0];
  for (const point of nullCurve) if (point.typeIError > max.typeIError) max = point;
  const atControl = ocs.get(controlRate) ?? null;
  const nullPoint = atControl ? { controlRate, experimentalRate: onNullBoundary(controlRate, delta) } : { controlRate: max.controlRate, experimentalRate: max.experimentalRate };
  const atTarget = exactTwoArmOperatingCharacteristics(boundaries, experimentalRate, controlRate);
  return {
    delta,
    nullCurve,
    typeIError: max.typeIError,
    typeIErrorMaxAt: { controlRate: max.controlRate, experimentalRate: max.experimentalRate },
    controlRateRange: { from: rates[0], to: rates[rates.length - 1] },
    typeIErrorAtControlRate: atControl ? atControl.pDeclareSuccess : null,
    nullPoint,
    atNull: atControl ?? (ocs.get(max.controlRate) as TwoArmOperatingCharacteristics),
    power: atTarget.pDeclareSuccess,
    atTarget,
  };
}

/**
 * Two-arm type I error (maximum over control rates on the null boundary pT = pC + delta) and power
 * at the design's alternative (experimentalRate, controlRate). See twoArmErrorRatesFromBoundaries.
 */
export function twoArmTypeIErrorAndPower(design: TwoArmDesign, options: { controlRates?: readonly number[] } = {}): TwoArmErrorRates {
  return twoArmErrorRatesFromBoundaries(twoArmBoundaries(design).response, design, options.controlRates);
}

/**
 * Safety-only characteristics of a design's safety rule at true toxicity rate q, at the design's
 * planned looks; null when the design has no safety rule.
 */
export function safetyOperatingCharacteristics(design: Design, q: number): SafetyOperatingCharacteristics | null {
  if (!design.safety) return null;
  const looks = expandLooks(design.looks, design.arms === "single" ? design.nMax : design.nMaxPerArm);
  return exactSafetyOperatingCharacteristics(safetyBoundaries(design.safety, looks), q);
}

/**
 * The summaries shared by the single- and two-arm recursions, from the per-look stopping
 * probabilities. Early termination counts stops before the last look; type I error and power count
 * success at the end plus early efficacy stops; the expected sample size counts patients at the stop.
 */
function summariseLooks<L extends { n: number; pStopFutility: number; pStopEfficacy: number }>(looks: L[]) {
  const interim = looks.slice(0, -1);
  const last = looks[looks.length - 1];
  const pEarlyFutility = interim.reduce((s, l) => s + l.pStopFutility, 0);
  const pEarlyEfficacy = interim.reduce((s, l) => s + l.pStopEfficacy, 0);
  const sampleSizeDistribution = looks.map((l) => ({ n: l.n, probability: l.pStopFutility + l.pStopEfficacy }));
  return {
    looks,
    pEarlyFutility,
    pEarlyEfficacy,
    pEarlyTermination: pEarlyFutility + pEarlyEfficacy,
    pSuccessAtEnd: last.pStopEfficacy,
    pNoSuccessAtEnd: last.pStopFutility,
    pDeclareSuccess: last.pStopEfficacy + pEarlyEfficacy,
    expectedSampleSize: sampleSizeDistribution.reduce((s, d) => s + d.n * d.probability, 0),
    sampleSizeDistribution,
  };
}

// ---------------------------------------------------------------------------------------------
// Response and safety together
// ---------------------------------------------------------------------------------------------

export type SafetyAwareLookOutcome = {
  n: number;
  /** P(the trial stops for safety at this look) (safety is checked first, the final look included). */
  pStopSafety: number;
  /** P(the trial stops for futility at this look); at the final look: P(no success, no safety stop). */
  pStopFutility: number;
  /** P(the trial stops for efficacy at this look); at the final look: P(success). */
  pStopEfficacy: number;
  /** P(the trial is still running after this look) (0 at the final look). */
  pContinue: number;
};

export type SafetyAwareOperatingCharacteristics = {
  /** True toxicity rate (of the experimental arm in a two-arm design). */
  q: number;
  looks: SafetyAwareLookOutcome[];
  pEarlyFutility: number;
  pEarlyEfficacy: number;
  /** P(a safety stop before nMax). */
  pEarlySafety: number;
  /** P(a safety stop at any look, the final analysis included). */
  pSafetyStop: number;
  /** P(any stop before nMax: futility, efficacy or safety). */
  pEarlyTermination: number;
  pSuccessAtEnd: number;
  /** P(efficacy declared) = P(early efficacy stop) + P(success at the end); a safety stop declares nothing. */
  pDeclareSuccess: number;
  /** Expected patients (per arm for two arms) at the stop. */
  expectedSampleSize: number;
  sampleSizeDistribution: { n: number; probability: number }[];
};

/**
 * Joint operating characteristics of the response rule and the safety rule, assuming each patient's
 * response and toxicity are independent (so the responder path and the toxicity path are
 * independent processes over the same looks). This is an assumption about the disease and the
 * drug, not a fact: correlated response and toxicity change these numbers, and the screens say so.
 *
 * Under independence the forward recursion over the joint (responders, toxicities) state factorises
 * exactly, so it is computed from the two one-dimensional recursions: with R(k) the probability that
 * the response rule has not stopped after look k, A(k) the probability that the safety rule has not
 * triggered through look k (safety alone), and F(k), E(k) the response rule's futility and efficacy
 * stops at look k, the checks in decision order (safety first) give
 *   P(safety stop at k) = R(k - 1) (A(k - 1) - A(k)),  P(futility at k) = A(k) F(k),
 *   P(efficacy at k) = A(k) E(k),  P(running after k) = A(k) R(k).
 * The test file checks this against a two-dimensional recursion, brute-force enumeration of every
 * patient sequence, and simulation.
 *
 * @param response - per-look outcomes of the response rule alone (single- or two-arm recursion)
 * @param safety - from `exactSafetyOperatingCharacteristics` at the same look sizes
 */
export function combineResponseAndSafety(
  response: Pick<LookOutcome, "n" | "pStopFutility" | "pStopEfficacy" | "pContinue">[],
  safety: SafetyOperatingCharacteristics,
): SafetyAwareOperatingCharacteristics {
  if (!Array.isArray(response) || response.length === 0 || response.length !== safety.looks.length)
    throw new StatsDomainError("safety.looks", safety.looks.length, `must have one entry per response look (${response?.length})`);
  let runningResponse = 1;
  let clearSafety = 1;
  const looks: SafetyAwareLookOutcome[] = response.map((r, k) => {
    const s = safety.looks[k];
    if (s.n !== r.n) throw new StatsDomainError("safety.looks.n", s.n, `must equal the response look ${r.n}`);
    const clearAfter = clearSafety - s.pSafetyStop;
    const out = {
      n: r.n,
      pStopSafety: runningResponse * s.pSafetyStop,
      pStopFutility: clearAfter * r.pStopFutility,
      pStopEfficacy: clearAfter * r.pStopEfficacy,
      pContinue: clearAfter * r.pContinue,
    };
    runningResponse = r.pContinue;
    clearSafety = clearAfter;
    return out;
  });
  const interim = looks.slice(0, -1);
  const last = looks[looks.length - 1];
  const sum = (xs: SafetyAwareLookOutcome[], f: (l: SafetyAwareLookOutcome) => number) => xs.reduce((t, l) => t + f(l), 0);
  const pEarlyFutility = sum(interim, (l) => l.pStopFutility);
  const pEarlyEfficacy = sum(interim, (l) => l.pStopEfficacy);
  const pEarlySafety = sum(interim, (l) => l.pStopSafety);
  const sampleSizeDistribution = looks.map((l) => ({ n: l.n, probability: l.pStopSafety + l.pStopFutility + l.pStopEfficacy }));
  return {
    q: safety.q,
    looks,
    pEarlyFutility,
    pEarlyEfficacy,
    pEarlySafety,
    pSafetyStop: pEarlySafety + last.pStopSafety,
    pEarlyTermination: pEarlyFutility + pEarlyEfficacy + pEarlySafety,
    pSuccessAtEnd: last.pStopEfficacy,
    pDeclareSuccess: pEarlyEfficacy + last.pStopEfficacy,
    expectedSampleSize: sampleSizeDistribution.reduce((t, d) => t + d.n * d.probability, 0),
    sampleSizeDistribution,
  };
}

/**
 * Exact joint operating characteristics of a design with a safety rule over a grid of true
 * toxicity rates, at one true response rate (single arm: `rate`; two arms: [pT, pC]). Response and
 * toxicity are assumed independent (see `combineResponseAndSafety`). Boundaries are computed once.
 * @throws StatsDomainError when the design has no safety rule, or for an invalid rate.
 */
export function operatingCharacteristicsWithSafety(
  design: Design,
  rate: number | [number, number],
  toxicityRates: number[],
): SafetyAwareOperatingCharacteristics[] {
  if (!design.safety) throw new StatsDomainError("design.safety", design.safety, "is required for operating characteristics with safety");
  if (!Array.isArray(toxicityRates)) throw new StatsDomainError("toxicityRates", toxicityRates, "must be an array of rates");
  let response: LookOutcome[];
  let looks: number[];
  if (design.arms === "single") {
    if (typeof rate !== "number") throw new StatsDomainError("rate", rate, "must be one response rate for a single-arm design");
    const b = singleArmBoundaries(design);
    looks = b.looks;
    response = exactOperatingCharacteristics(b.response, rate).looks;
  } else {
    if (!Array.isArray(rate) || rate.length !== 2) throw new StatsDomainError("rate", rate, "must be a [pT, pC] pair for a two-arm design");
    const b = twoArmBoundaries(design);
    looks = b.looks;
    response = exactTwoArmOperatingCharacteristics(b.response, rate[0], rate[1]).looks;
  }
  const safetyTable = safetyBoundaries(design.safety, looks);
  return toxicityRates.map((q) => combineResponseAndSafety(response, exactSafetyOperatingCharacteristics(safetyTable, q)));
}
