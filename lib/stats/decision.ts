/**
 * The decision at one look, for single-arm and two-arm designs, by the predictive (Lee & Liu 2008)
 * or the posterior-probability (Thall & Simon 1994 style) rule, plus the optional safety rule
 * (Thall, Simon & Estey 1995 style).
 *
 * Order of checks: safety first (a safety signal outranks efficacy or futility), then at nMax the
 * final rule, otherwise futility, then efficacy. Strict inequalities: a tie never triggers.
 * The result is decision support; the DMC decides under its charter and the protocol.
 */
import type { Design, LookDecision, MixtureBeta, MonitoringRule, SafetyRule, SingleArmDesign, TwoArmDesign } from "./types";
import { resolvePrior, mixtureSurvival } from "./priors";
import { expandLooks } from "./looks";
import { probDifferenceExceeds } from "./difference";
import {
  posteriorMixture,
  predictiveProbabilitySingleArm,
  predictiveProbabilityTwoArm,
  requireDelta,
  singleArmFinalSuccess,
  twoArmFinalRule,
  type TwoArmFinalRule,
} from "./predictive";
import { requireData, requireProbability, StatsDomainError } from "./validate";

/** Interim counts of a single-arm trial. `toxicities` is required when the design has a safety rule. */
export type SingleArmLookData = { n: number; responders: number; toxicities?: number | null };
/**
 * Interim counts of a two-arm trial. The safety rule, when present, watches the experimental arm:
 * `toxicitiesT` patients with toxicity among its nT.
 */
export type TwoArmLookData = {
  nT: number;
  respondersT: number;
  nC: number;
  respondersC: number;
  toxicitiesT?: number | null;
};

/** A decision with the quantities it rests on (unrounded). */
export type LookEvaluation = {
  decision: LookDecision;
  /** True when the final rule was applied (n = nMax; two arms: both arms at nMaxPerArm). */
  final: boolean;
  /** Predictive probability of success at an interim under the predictive rule; null otherwise. */
  predictiveProbability: number | null;
  /** P(p > p0 | data) (two arms: P(pT - pC > delta | data)): the final rule's quantity at the current data. */
  posteriorProbabilitySuccess: number;
  /** Posterior rule at an interim: P(p > p0 + delta | data) (two arms: P(pT - pC > delta | data)); null otherwise. */
  posteriorProbabilityMonitoring: number | null;
  /** P(q > qmax | toxicities) when the design has a safety rule; null otherwise. */
  safetyProbability: number | null;
};

// ---------------------------------------------------------------------------------------------
// Validation
// ---------------------------------------------------------------------------------------------

/** Check a monitoring rule. @throws StatsDomainError naming the field and rule broken. */
export function validateRule(rule: MonitoringRule): void {
  if (!rule || typeof rule !== "object") throw new StatsDomainError("rule", rule, "must be a monitoring rule object");
  if (rule.kind !== "predictive" && rule.kind !== "posterior")
    throw new StatsDomainError("rule.kind", rule.kind, 'must be "predictive" or "posterior"');
  requireProbability("rule.thetaT", rule.thetaT, { closed: true });
  requireProbability("rule.futilityThreshold", rule.futilityThreshold, { closed: true });
  if (typeof rule.efficacyStopping !== "boolean")
    throw new StatsDomainError("rule.efficacyStopping", rule.efficacyStopping, "must be true or false");
  if (rule.efficacyStopping) {
    if (rule.efficacyThreshold === null || rule.efficacyThreshold === undefined)
      throw new StatsDomainError("rule.efficacyThreshold", rule.efficacyThreshold, "is required when efficacy stopping is on");
    requireProbability("rule.efficacyThreshold", rule.efficacyThreshold, { closed: true });
    if (!(rule.efficacyThreshold > rule.futilityThreshold))
      throw new StatsDomainError(
        "rule.efficacyThreshold",
        rule.efficacyThreshold,
        `must exceed the futility threshold ${rule.futilityThreshold} so one look cannot call both`,
      );
  }
}

/** Check a safety rule. */
export function validateSafety(safety: SafetyRule): MixtureBeta {
  if (!safety || typeof safety !== "object") throw new StatsDomainError("safety", safety, "must be a safety rule object");
  requireProbability("safety.qmax", safety.qmax);
  requireProbability("safety.thetaS", safety.thetaS, { closed: true });
  return resolvePrior(safety.prior);
}

/** Check a single-arm design and return its resolved prior and looks. */
export function validateSingleArmDesign(d: SingleArmDesign): { prior: MixtureBeta; looks: number[] } {
  if (!d || d.arms !== "single") throw new StatsDomainError("design.arms", d?.arms, 'must be "single"');
  const prior = resolvePrior(d.prior);
  requireProbability("p0", d.p0);
  requireProbability("p1", d.p1);
  validateRule(d.rule);
  if (d.rule.kind === "posterior") {
    requireDelta(d.delta);
    requireProbability("p0 + delta", d.p0 + d.delta);
  }
  const looks = expandLooks(d.looks, d.nMax);
  if (d.safety) validateSafety(d.safety);
  return { prior, looks };
}

/** Check a two-arm design and return its resolved priors and looks (per-arm sizes). */
export function validateTwoArmDesign(d: TwoArmDesign): { priorT: MixtureBeta; priorC: MixtureBeta; looks: number[] } {
  if (!d || d.arms !== "two") throw new StatsDomainError("design.arms", d?.arms, 'must be "two"');
  const priorT = resolvePrior(d.priorT);
  const priorC = resolvePrior(d.priorC);
  requireProbability("controlRate", d.controlRate);
  requireProbability("experimentalRate", d.experimentalRate);
  requireDelta(d.delta);
  validateRule(d.rule);
  const looks = expandLooks(d.looks, d.nMaxPerArm);
  if (d.safety) validateSafety(d.safety);
  return { priorT, priorC, looks };
}

// ---------------------------------------------------------------------------------------------
// Cached two-arm final rule (about 2N evaluations of the difference integral per design)
// ---------------------------------------------------------------------------------------------

const finalRuleCache = new Map<string, TwoArmFinalRule>();

/** Forget cached two-arm final tables (benchmarks use it to time the full computation). */
export function clearTwoArmFinalRuleCache(): void {
  finalRuleCache.clear();
}

/** The two-arm final success table for a design, computed once per distinct (priors, N, delta, thetaT). */
export function twoArmFinalRuleForDesign(d: TwoArmDesign): TwoArmFinalRule {
  const key = JSON.stringify([d.priorT, d.priorC, d.nMaxPerArm, d.delta, d.rule.thetaT]);
  const hit = finalRuleCache.get(key);
  if (hit) return hit;
  const rule = twoArmFinalRule(resolvePrior(d.priorT), resolvePrior(d.priorC), d.nMaxPerArm, d.delta, d.rule.thetaT);
  if (finalRuleCache.size >= 16) finalRuleCache.delete(finalRuleCache.keys().next().value as string);
  finalRuleCache.set(key, rule);
  return rule;
}

// ---------------------------------------------------------------------------------------------
// Wording
// ---------------------------------------------------------------------------------------------

/**
 * A probability to 3 decimals, with more digits when 3 would make it look equal to (or on the
 * other side of) the threshold it is compared with, so the sentence never contradicts itself.
 */
export function formatAgainst(value: number, threshold: number): string {
  if (value === 0 || value === 1) return String(value);
  for (let d = 3; d <= 12; d++) {
    const s = value.toFixed(d);
    const r = Number(s);
    if (value === threshold || (Math.sign(r - threshold) === Math.sign(value - threshold) && r !== threshold)) return s;
  }
  return String(value);
}

function percent(v: number): string {
  return `${(v * 100).toFixed(1)}%`;
}

function points(v: number): string {
  return `${(v * 100).toFixed(1)} percentage points`;
}

function describeThresholds(
  label: string,
  value: number,
  rule: MonitoringRule,
): { stop: "futility" | "efficacy" | null; text: string } {
  const lo = rule.futilityThreshold;
  const shownLo = formatAgainst(value, lo);
  if (value < lo)
    return {
      stop: "futility",
      text: `${label} ${shownLo} is below the futility threshold ${lo}: the data favour stopping for futility.`,
    };
  if (rule.efficacyStopping && rule.efficacyThreshold !== null) {
    const hi = rule.efficacyThreshold;
    const shownHi = formatAgainst(value, hi);
    if (value > hi)
      return {
        stop: "efficacy",
        text: `${label} ${shownHi} is above the efficacy threshold ${hi}: the data favour stopping for efficacy.`,
      };
    return {
      stop: null,
      text: `${label} ${formatAgainst(value, value > (lo + hi) / 2 ? hi : lo)} is not below the futility threshold ${lo} and not above the efficacy threshold ${hi}: the data support continuing to the next look.`,
    };
  }
  return {
    stop: null,
    text: `${label} ${shownLo} is not below the futility threshold ${lo} (efficacy stopping is off): the data support continuing to the next look.`,
  };
}

function safetyCheck(safety: SafetyRule, toxicities: number | null | undefined, n: number): { prob: number; decision: LookDecision | null } {
  if (toxicities === null || toxicities === undefined)
    throw new StatsDomainError("toxicities", toxicities, "is required when the design has a safety rule");
  requireData(toxicities, n);
  const prior = validateSafety(safety);
  const prob = mixtureSurvival(posteriorMixture(prior, toxicities, n), safety.qmax);
  if (prob > safety.thetaS)
    return {
      prob,
      decision: {
        action: "stop",
        stop: "safety",
        reason: `Posterior probability that the toxicity rate exceeds ${percent(safety.qmax)} is ${formatAgainst(prob, safety.thetaS)}, above the safety threshold ${safety.thetaS} (${toxicities} toxicities in ${n} patients): the data favour stopping for safety.`,
      },
    };
  return { prob, decision: null };
}

function finalDecision(prob: number, thetaT: number, what: string): LookDecision {
  const shown = formatAgainst(prob, thetaT);
  return prob > thetaT
    ? { action: "final", success: true, reason: `Final analysis: posterior probability that ${what} is ${shown}, above the success threshold ${thetaT}: the trial meets its success criterion.` }
    : { action: "final", success: false, reason: `Final analysis: posterior probability that ${what} is ${shown}, not above the success threshold ${thetaT}: the trial does not meet its success criterion.` };
}

function withSafetyNote(decision: LookDecision, safetyProb: number | null, safety: SafetyRule | null): LookDecision {
  if (safetyProb === null || !safety) return decision;
  return {
    ...decision,
    reason: `${decision.reason} No safety signal: posterior probability that the toxicity rate exceeds ${percent(safety.qmax)} is ${formatAgainst(safetyProb, safety.thetaS)}, not above the safety threshold ${safety.thetaS}.`,
  };
}

// ---------------------------------------------------------------------------------------------
// Decisions
// ---------------------------------------------------------------------------------------------

/**
 * The decision at a look.
 *
 * @param design - a validated single-arm or two-arm design
 * @param data - counts so far: single arm 0 <= responders <= n <= nMax; two arms per arm
 *   0 <= responders <= n <= nMaxPerArm. Any n may be evaluated, planned look or not.
 * @returns the decision, its reason in plain words, and the probabilities it rests on.
 * @throws StatsDomainError for an invalid design or counts, or a missing toxicity count when the
 *   design has a safety rule.
 */
export function decideAtLook(design: SingleArmDesign, data: SingleArmLookData): LookEvaluation;
export function decideAtLook(design: TwoArmDesign, data: TwoArmLookData): LookEvaluation;
export function decideAtLook(design: Design, data: SingleArmLookData | TwoArmLookData): LookEvaluation;
export function decideAtLook(design: Design, data: SingleArmLookData | TwoArmLookData): LookEvaluation {
  if (design?.arms === "single") return decideSingleArm(design, data as SingleArmLookData);
  if (design?.arms === "two") return decideTwoArm(design, data as TwoArmLookData);
  throw new StatsDomainError("design.arms", (design as { arms?: unknown })?.arms, 'must be "single" or "two"');
}

function decideSingleArm(d: SingleArmDesign, data: SingleArmLookData): LookEvaluation {
  const { prior } = validateSingleArmDesign(d);
  const { n, responders: x } = data;
  requireData(x, n);
  if (n > d.nMax) throw new StatsDomainError("n", n, `must not exceed nMax = ${d.nMax}`);
  const final = n === d.nMax;
  const post = posteriorMixture(prior, x, n);
  const pSuccess = mixtureSurvival(post, d.p0);
  let safetyProbability: number | null = null;
  const base = { final, posteriorProbabilitySuccess: pSuccess };
  if (d.safety) {
    const s = safetyCheck(d.safety, data.toxicities, n);
    safetyProbability = s.prob;
    if (s.decision)
      return { ...base, decision: s.decision, predictiveProbability: null, posteriorProbabilityMonitoring: null, safetyProbability };
  } else if (data.toxicities !== undefined && data.toxicities !== null) requireData(data.toxicities, n);

  if (final) {
    const decision = finalDecision(pSuccess, d.rule.thetaT, `the response rate exceeds ${percent(d.p0)}`);
    return { ...base, decision: withSafetyNote(decision, safetyProbability, d.safety), predictiveProbability: null, posteriorProbabilityMonitoring: null, safetyProbability };
  }
  if (d.rule.kind === "predictive") {
    const pp = predictiveProbabilitySingleArm({ prior, x, n, nMax: d.nMax, p0: d.p0, thetaT: d.rule.thetaT, finalSuccess: cachedFinalSuccess(prior, d) });
    const t = describeThresholds("Predictive probability of success", pp, d.rule);
    return { ...base, decision: withSafetyNote(toDecision(t), safetyProbability, d.safety), predictiveProbability: pp, posteriorProbabilityMonitoring: null, safetyProbability };
  }
  const target = d.p0 + d.delta;
  const pm = d.delta === 0 ? pSuccess : mixtureSurvival(post, target);
  const t = describeThresholds(`Posterior probability that the response rate exceeds ${percent(target)}`, pm, d.rule);
  return { ...base, decision: withSafetyNote(toDecision(t), safetyProbability, d.safety), predictiveProbability: null, posteriorProbabilityMonitoring: pm, safetyProbability };
}

const successCache = new Map<string, Uint8Array>();
function cachedFinalSuccess(prior: MixtureBeta, d: SingleArmDesign): Uint8Array {
  const key = JSON.stringify([prior, d.nMax, d.p0, d.rule.thetaT]);
  let hit = successCache.get(key);
  if (!hit) {
    hit = singleArmFinalSuccess(prior, d.nMax, d.p0, d.rule.thetaT);
    if (successCache.size >= 64) successCache.delete(successCache.keys().next().value as string);
    successCache.set(key, hit);
  }
  return hit;
}

function toDecision(t: { stop: "futility" | "efficacy" | null; text: string }): LookDecision {
  return t.stop ? { action: "stop", stop: t.stop, reason: t.text } : { action: "continue", reason: t.text };
}

function decideTwoArm(d: TwoArmDesign, data: TwoArmLookData): LookEvaluation {
  const { priorT, priorC } = validateTwoArmDesign(d);
  const { nT, respondersT: xT, nC, respondersC: xC } = data;
  requireData(xT, nT);
  requireData(xC, nC);
  if (nT > d.nMaxPerArm) throw new StatsDomainError("nT", nT, `must not exceed nMaxPerArm = ${d.nMaxPerArm}`);
  if (nC > d.nMaxPerArm) throw new StatsDomainError("nC", nC, `must not exceed nMaxPerArm = ${d.nMaxPerArm}`);
  const final = nT === d.nMaxPerArm && nC === d.nMaxPerArm;
  const pDiff = probDifferenceExceeds(posteriorMixture(priorT, xT, nT), posteriorMixture(priorC, xC, nC), d.delta);
  const base = { final, posteriorProbabilitySuccess: pDiff };
  let safetyProbability: number | null = null;
  if (d.safety) {
    const s = safetyCheck(d.safety, data.toxicitiesT, nT);
    safetyProbability = s.prob;
    if (s.decision)
      return { ...base, decision: s.decision, predictiveProbability: null, posteriorProbabilityMonitoring: null, safetyProbability };
  } else if (data.toxicitiesT !== undefined && data.toxicitiesT !== null) requireData(data.toxicitiesT, nT);
  const what = `the response rate difference (experimental minus control) exceeds ${points(d.delta)}`;
  if (final) {
    const decision = finalDecision(pDiff, d.rule.thetaT, what);
    return { ...base, decision: withSafetyNote(decision, safetyProbability, d.safety), predictiveProbability: null, posteriorProbabilityMonitoring: null, safetyProbability };
  }
  if (d.rule.kind === "predictive") {
    const pp = predictiveProbabilityTwoArm({ priorT, priorC, xT, nT, xC, nC, finalRule: twoArmFinalRuleForDesign(d) });
    const t = describeThresholds("Predictive probability of success", pp, d.rule);
    return { ...base, decision: withSafetyNote(toDecision(t), safetyProbability, d.safety), predictiveProbability: pp, posteriorProbabilityMonitoring: null, safetyProbability };
  }
  const t = describeThresholds(`Posterior probability that ${what}`, pDiff, d.rule);
  return { ...base, decision: withSafetyNote(toDecision(t), safetyProbability, d.safety), predictiveProbability: null, posteriorProbabilityMonitoring: pDiff, safetyProbability };
}
