/**
 * The design model shared by the engine, the database (stored as JSON in designs.spec) and the UI.
 * Every field is validated at the edge by the zod schema in lib/stats/design-schema.ts.
 */

/** A prior on a response (or toxicity) rate, as the statistician specifies it. */
export type PriorSpec =
  | { family: "uniform" } // Beta(1, 1)
  | { family: "jeffreys" } // Beta(0.5, 0.5)
  | { family: "beta"; a: number; b: number }
  /** Beta(mean * ess, (1 - mean) * ess). */
  | { family: "informative"; mean: number; ess: number }
  /** weight on Beta(mean * ess, (1 - mean) * ess), 1 - weight on the vague Beta(1, 1) (Schmidli et al. 2014). */
  | { family: "robustMixture"; mean: number; ess: number; weight: number };

/** One Beta component of a (possibly one-component) mixture. */
type BetaComponent = { weight: number; a: number; b: number };
/** The resolved form every computation works with: weights sum to 1. */
export type MixtureBeta = BetaComponent[];

/** Planned looks: an explicit list of (per-arm) enrolled counts, or every k from a first look. The last look is always nMax. */
export type LookSchedule = { kind: "list"; sizes: number[] } | { kind: "every"; first: number; every: number };

/** An uncertain standard rate: Beta(a, b), informative, usually from historical data on standard therapy. */
export type StandardRatePrior = { a: number; b: number };

/**
 * The monitoring rule. Every kind declares success at the final analysis when
 * P(p > p0 | all data) > thetaT (two arms: P(pT - pC > delta | all data) > thetaT).
 * - predictive (Lee & Liu 2008): at an interim, futility if PP < futilityThreshold (thetaL),
 *   efficacy if efficacyStopping and PP > efficacyThreshold (thetaU).
 * - posterior (posterior probability against a fixed rate): at an interim, futility if
 *   P(p > p0 + delta | data) < futilityThreshold (pL), efficacy if efficacyStopping and it exceeds
 *   efficacyThreshold (pU). Two arms: P(pT > pC + delta | data), the control arm's posterior
 *   standing in for the rate.
 * - uncertainStandard (Thall & Simon 1994 as published): the same thresholds on
 *   P(pE > pS + delta | data), where the standard rate pS ~ Beta(standard.a, standard.b) is itself
 *   uncertain and independent of pE. Single arm only needs `standard`; in a two-arm design the
 *   control arm's posterior plays pS's role, so `standard` must be absent there.
 * Strict inequalities: a tie does not trigger (lib/stats/compare.ts).
 */
export type MonitoringRule = {
  kind: "predictive" | "posterior" | "uncertainStandard";
  thetaT: number;
  futilityThreshold: number;
  efficacyStopping: boolean;
  efficacyThreshold: number | null;
  /** Single arm, kind "uncertainStandard": the standard rate's Beta. Absent or null otherwise. */
  standard?: StandardRatePrior | null;
};

/**
 * Safety monitoring on the toxicity rate q (its own prior, among patients evaluable for toxicity).
 * - fixed limit (kind absent or "fixedLimit"): safety stop if P(q > qmax | toxicities) > thetaS.
 * - uncertainStandard (Thall, Simon & Estey 1995): safety stop if P(q > qS + margin | toxicities) > thetaS,
 *   with the standard toxicity rate qS ~ Beta(standard.a, standard.b) independent of q.
 * Specs stored before the second form existed have no `kind` and mean the fixed limit.
 */
type FixedLimitSafetyRule = { kind?: "fixedLimit"; qmax: number; prior: PriorSpec; thetaS: number };
type UncertainStandardSafetyRule = {
  kind: "uncertainStandard";
  standard: StandardRatePrior;
  /** Added to qS; 0 compares with the standard itself, a positive margin tolerates that much more toxicity. */
  margin: number;
  prior: PriorSpec;
  thetaS: number;
};
export type SafetyRule = FixedLimitSafetyRule | UncertainStandardSafetyRule;

export type SingleArmDesign = {
  arms: "single";
  prior: PriorSpec;
  /** Uninteresting (null) response rate. */
  p0: number;
  /** Target rate for power. */
  p1: number;
  /** Margin of the posterior-probability rules at interims: P(p > p0 + delta) or P(pE > pS + delta). Default 0. */
  delta: number;
  nMax: number;
  looks: LookSchedule;
  rule: MonitoringRule;
  safety: SafetyRule | null;
};

export type TwoArmDesign = {
  arms: "two";
  /** T is experimental, C is control. */
  priorT: PriorSpec;
  priorC: PriorSpec;
  /**
   * Assumed control rate, for operating characteristics: power at (experimentalRate, controlRate);
   * type I error on the null boundary pT = pC + delta, reported over a range of control rates that includes this one.
   */
  controlRate: number;
  /** Experimental rate for power. */
  experimentalRate: number;
  /** Decision margin on the difference scale; negative for non-inferiority. */
  delta: number;
  /** Maximum evaluable patients per arm (equal allocation). */
  nMaxPerArm: number;
  /** Per-arm enrolled counts at the looks. */
  looks: LookSchedule;
  rule: MonitoringRule;
  safety: SafetyRule | null;
};

export type Design = SingleArmDesign | TwoArmDesign;

type StopReason = "futility" | "efficacy" | "safety";
/** The outcome at a look: stop with a reason, continue, or (at nMax) success / no success. */
export type LookDecision =
  | { action: "continue"; reason: string }
  | { action: "stop"; stop: StopReason; reason: string }
  | { action: "final"; success: boolean; reason: string };
