/**
 * The decision at one look, for single-arm and two-arm designs, by the predictive rule (Lee & Liu
 * 2008), the posterior probability against a fixed rate, or the posterior probability against an
 * uncertain standard rate (Thall & Simon 1994 as published), plus the optional safety rule (against
 * a fixed limit, or against an uncertain standard toxicity rate plus a margin as in Thall, Simon &
 * Estey 1995).
 *
 * Order of checks: safety first (a safety signal outranks efficacy or futility), then at nMax the
 * final rule, otherwise futility, then efficacy. Strict inequalities: a tie never triggers.
 * The result is decision support; the DMC decides under its charter and the protocol.
 */
import type { Design, LookDecision, MixtureBeta, MonitoringRule, SafetyRule, SingleArmDesign, StandardRatePrior, TwoArmDesign } from "./types";
import { exceedsThreshold, fallsBelowThreshold, tiesThreshold } from "./compare";
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
import { requireData, requireFinite, requireProbability, StatsDomainError } from "./validate";

/** Interim counts of a single-arm trial. `toxicities` is required when the design has a safety rule. */
type SingleArmLookData = { n: number; responders: number; toxicities?: number | null };
/**
 * Interim counts of a two-arm trial. The safety rule, when present, watches the experimental arm:
 * `toxicitiesT` patients with toxicity among its nT.
 */
type TwoArmLookData = {
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
  /**
   * Posterior rules at an interim: P(p > p0 + delta | data) against a fixed rate, P(pE > pS + delta | data)
   * against an uncertain standard (two arms: P(pT - pC > delta | data)); null otherwise.
   */
  posteriorProbabilityMonitoring: number | null;
  /** P(q > qmax | toxicities), or P(q > qS + margin | toxicities), when the design has a safety rule; null otherwise. */
  safetyProbability: number | null;
};

// ---------------------------------------------------------------------------------------------
// Validation
// ---------------------------------------------------------------------------------------------

/** Check a monitoring rule. @throws StatsDomainError naming the field and rule broken. */
function validateRule(rule: MonitoringRule): void {
  if (!rule || typeof rule !== "object") throw new StatsDomainError("rule", rule, "must be a monitoring rule object");
  if (rule.kind !== "predictive" && rule.kind !== "posterior" && rule.kind !== "uncertainStandard")
    throw new StatsDomainError("rule.kind", rule.kind, 'must be "predictive", "posterior" or "uncertainStandard"');
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

/** Check an uncertain standard rate's Beta(a, b) and return it as a one-component mixture. */
function validateStandard(name: string, standard: StandardRatePrior | null | undefined): MixtureBeta {
  if (!standard || typeof standard !== "object") throw new StatsDomainError(name, standard, "must be a Beta(a, b) for the standard rate");
  requireFinite(`${name}.a`, standard.a);
  requireFinite(`${name}.b`, standard.b);
  if (!(standard.a > 0)) throw new StatsDomainError(`${name}.a`, standard.a, "must be greater than 0");
  if (!(standard.b > 0)) throw new StatsDomainError(`${name}.b`, standard.b, "must be greater than 0");
  return [{ weight: 1, a: standard.a, b: standard.b }];
}

/** Check a safety rule. */
export function validateSafety(safety: SafetyRule): MixtureBeta {
  if (!safety || typeof safety !== "object") throw new StatsDomainError("safety", safety, "must be a safety rule object");
  if (safety.kind === "uncertainStandard") {
    validateStandard("safety.standard", safety.standard);
    requireFinite("safety.margin", safety.margin);
    if (!(safety.margin > -1 && safety.margin < 1)) throw new StatsDomainError("safety.margin", safety.margin, "must lie strictly between -1 and 1");
  } else {
    if (safety.kind !== undefined && safety.kind !== "fixedLimit")
      throw new StatsDomainError("safety.kind", (safety as { kind: unknown }).kind, 'must be "fixedLimit" or "uncertainStandard"');
    requireProbability("safety.qmax", safety.qmax);
  }
  requireProbability("safety.thetaS", safety.thetaS, { closed: true });
  return resolvePrior(safety.prior);
}

/**
 * The safety rule's probability from the toxicity posterior: P(q > qmax) for a fixed limit, or
 * P(q > qS + margin) with qS ~ Beta(aS, bS) independent of q (by the difference quadrature).
 * @param safety - a validated safety rule
 * @param posterior - the toxicity rate's posterior mixture
 */
export function safetyProbabilityFromPosterior(safety: SafetyRule, posterior: MixtureBeta): number {
  if (safety.kind === "uncertainStandard")
    return probDifferenceExceeds(posterior, [{ weight: 1, a: safety.standard.a, b: safety.standard.b }], safety.margin);
  return mixtureSurvival(posterior, safety.qmax);
}

/** What the toxicity rate is compared with, in words: "30.0%" or "the standard toxicity rate ... plus ...". */
export function safetyLimitPhrase(safety: SafetyRule): string {
  if (safety.kind === "uncertainStandard") {
    const { a, b } = safety.standard;
    const base = `the uncertain standard toxicity rate (Beta(${a}, ${b}), mean ${percent(a / (a + b))})`;
    return safety.margin === 0 ? base : `${base} ${safety.margin > 0 ? "plus" : "minus"} ${points(Math.abs(safety.margin))}`;
  }
  return percent(safety.qmax);
}

export { monitoringRuleLabel, safetyRuleLabel } from "./labels";

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
  if (d.rule.kind === "uncertainStandard") {
    requireDelta(d.delta);
    validateStandard("rule.standard", d.rule.standard);
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
  if (d.rule.standard)
    throw new StatsDomainError("rule.standard", d.rule.standard, "must be absent in a two-arm design: the control arm's posterior is the standard");
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
    // A tie (lib/stats/compare.ts) is shown as equal to the threshold, which is what the rule treats it as.
    if (value === threshold || tiesThreshold(value, threshold)) return tiesThreshold(r, threshold) ? s : String(threshold);
    if (Math.sign(r - threshold) === Math.sign(value - threshold) && r !== threshold) return s;
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
  if (fallsBelowThreshold(value, lo))
    return {
      stop: "futility",
      text: `${label} ${shownLo} is below the futility threshold ${lo}: the data favour stopping for futility.`,
    };
  if (rule.efficacyStopping && rule.efficacyThreshold !== null) {
    const hi = rule.efficacyThreshold;
    const shownHi = formatAgainst(value, hi);
    if (exceedsThreshold(value, hi))
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
  const prob = safetyProbabilityFromPosterior(safety, posteriorMixture(prior, toxicities, n));
  if (exceedsThreshold(prob, safety.thetaS))
    return {
      prob,
      decision: {
        action: "stop",
        stop: "safety",
        reason: `Posterior probability that the toxicity rate exceeds ${safetyLimitPhrase(safety)} is ${formatAgainst(prob, safety.thetaS)}, above the toxicity alarm level ${safety.thetaS} (${toxicities} toxicities in ${n} patients): the data favour stopping for safety.`,
      },
    };
  return { prob, decision: null };
}

function finalDecision(prob: number, thetaT: number, what: string): LookDecision {
  const shown = formatAgainst(prob, thetaT);
  return exceedsThreshold(prob, thetaT)
    ? { action: "final", success: true, reason: `Final analysis: posterior probability that ${what} is ${shown}, above the success threshold ${thetaT}: the trial meets its success criterion.` }
    : { action: "final", success: false, reason: `Final analysis: posterior probability that ${what} is ${shown}, not above the success threshold ${thetaT}: the trial does not meet its success criterion.` };
}

function withSafetyNote(decision: LookDecision, safetyProb: number | null, safety: SafetyRule | null): LookDecision {
  if (safetyProb === null || !safety) return decision;
  return {
    ...decision,
    reason: `${decision.reason} No safety signal: posterior probability that the toxicity rate exceeds ${safetyLimitPhrase(safety)} is ${formatAgainst(safetyProb, safety.thetaS)}, not above the toxicity alarm level ${safety.thetaS}.`,
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
  const pm = singleArmMonitoringProbability(post, d, pSuccess);
  const t = describeThresholds(`Posterior probability that the response rate exceeds ${singleArmMonitoringTarget(d)}`, pm, d.rule);
  return { ...base, decision: withSafetyNote(toDecision(t), safetyProbability, d.safety), predictiveProbability: null, posteriorProbabilityMonitoring: pm, safetyProbability };
}

/**
 * The posterior rules' monitoring probability at an interim of a single-arm design:
 * P(p > p0 + delta | data) against a fixed rate; P(pE > pS + delta | data) with pS ~ Beta(aS, bS)
 * independent of pE against an uncertain standard (Thall & Simon 1994), by the difference quadrature.
 * @param post - the response rate's posterior mixture
 * @param d - a validated single-arm design with a posterior rule
 * @param pSuccess - optional P(p > p0 | data), reused when delta = 0 under the fixed-rate rule
 */
export function singleArmMonitoringProbability(post: MixtureBeta, d: Pick<SingleArmDesign, "p0" | "delta" | "rule">, pSuccess?: number): number {
  if (d.rule.kind === "uncertainStandard")
    return probDifferenceExceeds(post, validateStandard("rule.standard", d.rule.standard), d.delta);
  if (d.delta === 0 && pSuccess !== undefined) return pSuccess;
  return mixtureSurvival(post, d.p0 + d.delta);
}

function singleArmMonitoringTarget(d: SingleArmDesign): string {
  if (d.rule.kind !== "uncertainStandard") return percent(d.p0 + d.delta);
  const { a, b } = d.rule.standard as StandardRatePrior;
  const base = `the uncertain standard rate (Beta(${a}, ${b}), mean ${percent(a / (a + b))})`;
  return d.delta === 0 ? base : `${base} ${d.delta > 0 ? "plus" : "minus"} ${points(Math.abs(d.delta))}`;
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
