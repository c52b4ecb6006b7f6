/**
 * The design studio's live preview: stopping boundaries and exact operating characteristics of a
 * design, computed by lib/stats. Pure; the route handler validates the design and calls this.
 * JSON-friendly (numbers unrounded, null where no count stops).
 */
import type { Design, SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";
import { singleArmBoundaries, twoArmBoundaries } from "@/lib/stats/boundaries";
import {
  combineResponseAndSafety,
  exactOperatingCharacteristics,
  exactSafetyOperatingCharacteristics,
  exactTwoArmOperatingCharacteristics,
  twoArmErrorRatesFromBoundaries,
  TWO_ARM_NULL_CONTROL_RATES,
  type OperatingCharacteristics,
  type SafetyAwareOperatingCharacteristics,
  type TwoArmNullPoint,
  type TwoArmOperatingCharacteristics,
} from "@/lib/stats/operating-characteristics";
import { safetyBoundaries } from "@/lib/stats/boundaries";
import { summarisePrior } from "./prior-summary";

type OcSummary = {
  pDeclareSuccess: number;
  pEarlyTermination: number;
  pEarlyFutility: number;
  pEarlyEfficacy: number;
  expectedSampleSize: number;
  sampleSizeDistribution: { n: number; probability: number }[];
};

/** Joint response-and-safety characteristics at one true toxicity rate (response and toxicity assumed independent). */
type SafetyOcSummary = {
  pSafetyStop: number;
  pEarlySafety: number;
  pEarlyFutility: number;
  pEarlyEfficacy: number;
  pDeclareSuccess: number;
  expectedSampleSize: number;
};
type SafetyOcRow = { q: number; atNull: SafetyOcSummary; atTarget: SafetyOcSummary };

type PriorPreview = { label: string; mean: number; ess: number; density: { x: number[]; y: number[] } };

export type SingleArmPreview = {
  arms: "single";
  looks: number[];
  nMax: number;
  boundaries: { n: number; final: boolean; futilityMax: number | null; efficacyMin: number | null; toxicityMin: number | null }[];
  typeIError: number;
  power: number;
  atNull: OcSummary;
  atTarget: OcSummary;
  /** P(declare success) and E(N) over true response rates. */
  curve: CurvePoint[];
  /** Over true toxicity rates, when the design has a safety rule; null otherwise. */
  safetyGrid: SafetyOcRow[] | null;
  priors: PriorPreview[];
};

export type TwoArmPreview = {
  arms: "two";
  looks: number[];
  nMaxPerArm: number;
  /** Per look and control count xC: the experimental-arm counts that stop. */
  boundaries: { n: number; final: boolean; xC: number; futilityMaxT: number | null; efficacyMinT: number | null }[];
  safety: { n: number; toxicityMin: number | null }[] | null;
  delta: number;
  /** Largest type I error on the null boundary pT = pC + delta over `nullCurve` (not at pT = pC unless delta = 0). */
  typeIError: number;
  typeIErrorMaxAt: { controlRate: number; experimentalRate: number };
  /** Range of control rates the maximum is taken over, and the grid step between them (the assumed control rate is added). */
  controlRateRange: { from: number; to: number };
  controlRateStep: number;
  /** Type I error at the assumed control rate (pT = controlRate + delta); null when that pair leaves (0, 1). */
  typeIErrorAtControlRate: number | null;
  /** Type I error along pT = pC + delta, per control rate (pairs outside (0, 1) skipped). */
  nullCurve: TwoArmNullPoint[];
  /** Power at the design's alternative (experimentalRate, controlRate). */
  power: number;
  /** The null-boundary pair `atNull` is computed at. */
  nullPoint: { controlRate: number; experimentalRate: number };
  atNull: OcSummary;
  atTarget: OcSummary;
  /** Over experimental rates with the control rate fixed at the assumed one. */
  curve: CurvePoint[];
  /** Over true toxicity rates, when the design has a safety rule; null otherwise. */
  safetyGrid: SafetyOcRow[] | null;
  priors: PriorPreview[];
};

export type DesignPreview = SingleArmPreview | TwoArmPreview;

/** One true rate of the OC curve; early termination split by reason (it is also given as the total). */
type CurvePoint = { rate: number; pDeclareSuccess: number; expectedSampleSize: number; pEarlyTermination: number; pEarlyFutility: number; pEarlyEfficacy: number };

function curvePoint(rate: number, oc: OperatingCharacteristics | TwoArmOperatingCharacteristics): CurvePoint {
  return { rate, pDeclareSuccess: oc.pDeclareSuccess, expectedSampleSize: oc.expectedSampleSize, pEarlyTermination: oc.pEarlyTermination, pEarlyFutility: oc.pEarlyFutility, pEarlyEfficacy: oc.pEarlyEfficacy };
}

function safetySummary(oc: SafetyAwareOperatingCharacteristics): SafetyOcSummary {
  return {
    pSafetyStop: oc.pSafetyStop,
    pEarlySafety: oc.pEarlySafety,
    pEarlyFutility: oc.pEarlyFutility,
    pEarlyEfficacy: oc.pEarlyEfficacy,
    pDeclareSuccess: oc.pDeclareSuccess,
    expectedSampleSize: oc.expectedSampleSize,
  };
}

/** Toxicity rates 0, 0.05, ..., 0.6 plus the rule's own reference rate (qmax, or mean of qS plus the margin). */
export function toxicityGrid(design: Design): number[] {
  const s = design.safety;
  if (!s) return [];
  const ref = s.kind === "uncertainStandard" ? s.standard.a / (s.standard.a + s.standard.b) + s.margin : s.qmax;
  const grid = Array.from({ length: 13 }, (_, i) => Math.round(i * 0.05 * 1e6) / 1e6);
  if (ref > 0 && ref < 1) grid.push(Math.round(ref * 1e6) / 1e6);
  return [...new Set(grid)].sort((a, b) => a - b);
}

/** The safety grid from the response rule's per-look outcomes at the null and target rates. */
function safetyGridFor(design: Design, looks: number[], atNull: OperatingCharacteristics["looks"], atTarget: OperatingCharacteristics["looks"]): SafetyOcRow[] | null {
  if (!design.safety) return null;
  const table = safetyBoundaries(design.safety, looks);
  return toxicityGrid(design).map((q) => {
    const s = exactSafetyOperatingCharacteristics(table, q);
    return { q, atNull: safetySummary(combineResponseAndSafety(atNull, s)), atTarget: safetySummary(combineResponseAndSafety(atTarget, s)) };
  });
}

function summary(oc: OperatingCharacteristics | TwoArmOperatingCharacteristics): OcSummary {
  return {
    pDeclareSuccess: oc.pDeclareSuccess,
    pEarlyTermination: oc.pEarlyTermination,
    pEarlyFutility: oc.pEarlyFutility,
    pEarlyEfficacy: oc.pEarlyEfficacy,
    expectedSampleSize: oc.expectedSampleSize,
    sampleSizeDistribution: oc.sampleSizeDistribution,
  };
}

/** Rates 0, step, 2 step, ..., 1 (exact decimals, so 0.3 is 0.3 and lines up with p0 and p1). */
function rateGrid(steps: number): number[] {
  return Array.from({ length: steps + 1 }, (_, i) => Math.round((i / steps) * 1e6) / 1e6);
}

export function singleArmPreview(design: SingleArmDesign, labels: { arm?: string } = {}): SingleArmPreview {
  const b = singleArmBoundaries(design);
  const atNull = exactOperatingCharacteristics(b.response, design.p0);
  const atTarget = exactOperatingCharacteristics(b.response, design.p1);
  const rates = [...new Set([...rateGrid(50), design.p0, design.p1])].sort((x, y) => x - y);
  const curve = rates.map((rate) => {
    return curvePoint(rate, exactOperatingCharacteristics(b.response, rate));
  });
  const priors: PriorPreview[] = [{ label: labels.arm ?? "Response rate", ...summarisePrior(design.prior) }];
  if (design.safety) priors.push({ label: "Toxicity rate (safety rule)", ...summarisePrior(design.safety.prior) });
  return {
    arms: "single",
    looks: b.looks,
    nMax: design.nMax,
    boundaries: b.response.map((r, k) => ({ n: r.n, final: r.final, futilityMax: r.futilityMax, efficacyMin: r.efficacyMin, toxicityMin: b.safety ? b.safety[k].toxicityMin : null })),
    typeIError: atNull.pDeclareSuccess,
    power: atTarget.pDeclareSuccess,
    atNull: summary(atNull),
    atTarget: summary(atTarget),
    curve,
    safetyGrid: safetyGridFor(design, b.looks, atNull.looks, atTarget.looks),
    priors: priors.map(({ label, mean, ess, density }) => ({ label, mean, ess, density })),
  };
}

/**
 * Grid step for the type I error curve along pT = pC + delta. Each point is one exact recursion,
 * whose cost grows with the cube of the per-arm size; above 100 per arm the preview uses every 0.1
 * instead of every 0.05 (about 80 ms per point at 200 per arm with 10 looks on the 2-core machine).
 */
export function nullCurveStep(nMaxPerArm: number): number {
  return nMaxPerArm > 100 ? 0.1 : 0.05;
}

function nullCurveControlRates(nMaxPerArm: number): number[] {
  return nMaxPerArm > 100 ? TWO_ARM_NULL_CONTROL_RATES.filter((_, i) => i % 2 === 1) : [...TWO_ARM_NULL_CONTROL_RATES];
}

export function twoArmPreview(design: TwoArmDesign, labels: { experimental?: string; control?: string } = {}): TwoArmPreview {
  const b = twoArmBoundaries(design);
  const errors = twoArmErrorRatesFromBoundaries(b.response, design, nullCurveControlRates(design.nMaxPerArm));
  const rates = [...new Set([...rateGrid(20), design.controlRate, design.experimentalRate])].sort((x, y) => x - y);
  const curve = rates.map((rate) => {
    return curvePoint(rate, exactTwoArmOperatingCharacteristics(b.response, rate, design.controlRate));
  });
  const boundaries = b.response.flatMap((r) => r.futilityMaxT.map((f, xC) => ({ n: r.n, final: r.final, xC, futilityMaxT: f, efficacyMinT: r.efficacyMinT[xC] })));
  const priors: PriorPreview[] = [
    { label: labels.experimental ?? "Experimental arm", ...summarisePrior(design.priorT) },
    { label: labels.control ?? "Control arm", ...summarisePrior(design.priorC) },
  ];
  if (design.safety) priors.push({ label: "Toxicity rate (safety rule)", ...summarisePrior(design.safety.prior) });
  return {
    arms: "two",
    looks: b.looks,
    nMaxPerArm: design.nMaxPerArm,
    boundaries,
    safety: b.safety,
    delta: design.delta,
    typeIError: errors.typeIError,
    typeIErrorMaxAt: errors.typeIErrorMaxAt,
    controlRateRange: errors.controlRateRange,
    controlRateStep: nullCurveStep(design.nMaxPerArm),
    typeIErrorAtControlRate: errors.typeIErrorAtControlRate,
    nullCurve: errors.nullCurve,
    power: errors.power,
    nullPoint: errors.nullPoint,
    atNull: summary(errors.atNull),
    atTarget: summary(errors.atTarget),
    curve,
    safetyGrid: safetyGridFor(design, b.looks, errors.atNull.looks, errors.atTarget.looks),
    priors: priors.map(({ label, mean, ess, density }) => ({ label, mean, ess, density })),
  };
}

export function designPreview(design: Design, labels: { arm?: string; experimental?: string; control?: string } = {}): DesignPreview {
  return design.arms === "single" ? singleArmPreview(design, labels) : twoArmPreview(design, labels);
}

/**
 * A size ceiling for the interactive preview: the two-arm tables grow with the cube of the
 * per-arm size, so beyond this the preview would hold the server for seconds per keystroke.
 * (Measured on the 2-core build machine: 200 per arm with 10 looks about 1.7 s, 400 per arm about 6 s.)
 * The two-arm type I error curve along pT = pC + delta adds one exact recursion per control rate
 * (19 up to 100 per arm, 9 above; see nullCurveStep).
 */
export const PREVIEW_MAX_PER_ARM = 200;
