/**
 * Everything the closed review shows for one locked analysis, computed from the locked design and
 * the stored cumulative per-look arm counts. Pure: no I/O, no clock (the caller passes the time),
 * so the reproducibility record can be recomputed and compared number for number.
 *
 * CLOSED output: arm-level counts, posteriors, predictive probabilities and boundary positions.
 * Only code that has passed requireTrialAccess(..., "viewClosed") may call this.
 */
import type { ArmCounts } from "@/lib/domain";
import type { Design, LookDecision, MixtureBeta, MonitoringRule, PriorSpec, SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";
import { resolvePrior, mixtureSurvival } from "@/lib/stats/priors";
import { posteriorMixture, predictiveProbabilitySingleArm, predictiveProbabilityTwoArm, singleArmFinalSuccess } from "@/lib/stats/predictive";
import { decideAtLook, safetyLimitPhrase, safetyProbabilityFromPosterior, twoArmFinalRuleForDesign, validateSingleArmDesign, validateTwoArmDesign, type LookEvaluation } from "@/lib/stats/decision";
import {
  boundaryFromStatistics,
  finalBoundaryFromSuccess,
  safetyBoundaries,
  singleArmBoundaries,
  singleArmInterimStatistics,
  twoArmBoundaries,
  type ResponseBoundary,
  type SafetyBoundary,
} from "@/lib/stats/boundaries";
import { exceedsThreshold } from "@/lib/stats/compare";
import { probDifferenceExceeds, differenceDensityGrid } from "@/lib/stats/difference";
import { expandLooks } from "@/lib/stats/looks";
import { ENGINE_VERSION } from "@/lib/stats/version";
import { requireData, StatsDomainError } from "@/lib/stats/validate";
import { clopperPearson, wilson, mixtureCurves, mixtureIntervalProbability, summarisePosterior, type Curves, type Interval, type PosteriorSummary } from "./posterior-summary";

export type ArmRole = "single" | "experimental" | "control";

export type ReviewArm = { id: number; label: string; role: ArmRole };

/**
 * Cumulative counts of one arm at one look (as stored in analysis_arm_counts). Two denominators:
 * `evaluable` (evaluable for response) for responders, `treated` (evaluable for toxicity) for
 * toxicities; treated and toxicities are null when the design records no toxicity.
 */
/** Pending patients are part of the future (lib/stats/pending.ts). */
export type ReviewArmCounts = ArmCounts;

/** plannedN: the planned look size this analysis was scheduled at (the evaluable count may differ). */
export type ReviewLook = { analysisId: number; lookNumber: number; cutoffDate: string | null; plannedN?: number | null; counts: ReviewArmCounts[] };


export type ReviewInput = {
  design: Design;
  arms: ReviewArm[];
  /** Locked or reviewed looks with their counts; looks after the reviewed one are ignored. */
  looks: ReviewLook[];
  /** The analysis under review. */
  analysisId: number;
  /** ISO time stamp for the reproducibility record (the caller's clock; keeps this function pure). */
  generatedAt: string;
  /** Credible level of the intervals; 0.95 is common practice (no source). */
  credibleLevel?: number;
  /** Points of the density and cumulative curves on [0, 1]. */
  gridPoints?: number;
};

export type { Curves };

export type ArmReview = {
  armId: number;
  label: string;
  role: ArmRole;
  enrolled: number;
  /** Patients evaluable for toxicity: the safety rule's denominator. */
  treated: number | null;
  /** Patients evaluable for response: the response posterior's denominator. */
  evaluable: number;
  /** Enrolled, response not yet known at the cut-off: future patients for the predictive probability. */
  pending: number;
  responders: number;
  toxicities: number | null;
  prior: MixtureBeta;
  posterior: MixtureBeta;
  summary: PosteriorSummary;
  /** P(p > p0 | data) for a single arm; P(p > controlRate) is not asked for two arms (null). */
  probAboveP0: number | null;
  clopperPearson: Interval;
  /** Wilson score interval (Brown, Cai & DasGupta 2001 recommend it over the exact one for coverage). */
  wilson: Interval;
  curves: Curves;
  priorCurves: Curves;
};

export type LookReview = {
  analysisId: number;
  lookNumber: number;
  cutoffDate: string | null;
  /** Patients evaluable for response (per arm for two arms: experimental, control). */
  n: number;
  nControl: number | null;
  responders: number;
  respondersControl: number | null;
  /** Patients evaluable for toxicity (treated) of the arm the safety rule watches (single or experimental). */
  treated: number | null;
  toxicities: number | null;
  plannedN: number | null;
  evaluation: LookEvaluation;
};

/**
 * Where one look's observation sits against the boundaries computed at the evaluable count actually
 * observed (which may differ from the planned look size), beside the boundaries at the planned size.
 * Two arms: the experimental arm's boundary, read at the observed control count and control n.
 */
type ObservedBoundaryRow = {
  lookNumber: number;
  plannedN: number | null;
  n: number;
  nControl: number | null;
  final: boolean;
  responders: number;
  controlResponders: number | null;
  futilityMax: number | null;
  efficacyMin: number | null;
  /** The boundaries of the planned look (null when the look has no planned size in this design's table). */
  planned: { n: number; futilityMax: number | null; efficacyMin: number | null } | null;
  /** "futility"/"efficacy": the observation is in that stopping region at the actual n; final look: "efficacy" means success. */
  region: "futility" | "continue" | "efficacy";
};

/** The safety counterpart: the toxicity boundary at the actual denominator and at the planned size. */
type ObservedSafetyRow = {
  lookNumber: number;
  plannedN: number | null;
  n: number;
  toxicities: number;
  toxicityMin: number | null;
  planned: { n: number; toxicityMin: number | null } | null;
  crossed: boolean;
};

export type BoundaryRow = ResponseBoundary & {
  /** Two arms: the control responder count the experimental boundary is read at, and how it was chosen. */
  controlResponders?: number;
  controlBasis?: "observed" | "projected";
};

export type SafetyReview = {
  /** The fixed limit qmax; for the uncertain-standard form, the standard's mean plus the margin (the chart's reference line). */
  qmax: number;
  /** What the toxicity rate is compared with, in words (fixed limit or uncertain standard plus margin). */
  limitLabel: string;
  thetaS: number;
  /** The denominator: patients evaluable for toxicity (treated), not the patients evaluable for response. */
  treated: number;
  toxicities: number;
  prior: MixtureBeta;
  posterior: MixtureBeta;
  summary: PosteriorSummary;
  probAboveLimit: number;
  /** True when the safety probability exceeds thetaS (strict, ties do not count: lib/stats/compare.ts). */
  crossed: boolean;
  boundary: SafetyBoundary[];
  /** n is the number treated (evaluable for toxicity) at each locked look. */
  observedPath: { lookNumber: number; n: number; toxicities: number }[];
  /** Each look's toxicities against the safety boundary at its actual denominator. */
  observed: ObservedSafetyRow[];
  curves: Curves;
};

type SensitivityRow = {
  key: "design" | "uniform" | "sceptical";
  label: string;
  description: string;
  arms: { armId: number; role: ArmRole; prior: MixtureBeta; posterior: MixtureBeta; summary: PosteriorSummary; probAboveP0: number | null }[];
  /** Two arms: P(pT - pC > delta | data) under this prior pair. */
  probDifferenceExceeds: number | null;
  /** Single arm: predictive probability of success under this prior (null at the final look or for two arms). */
  predictiveProbability: number | null;
};

export type Review = {
  analysisId: number;
  lookNumber: number;
  cutoffDate: string | null;
  designKind: "single" | "two";
  credibleLevel: number;
  /** What the posterior plot marks: the fixed rate p0 (single arm) or the control arm's posterior. */
  reference: { kind: "p0"; value: number } | { kind: "control"; armId: number };
  arms: ArmReview[];
  difference: { delta: number; probExceeds: number; grid: { d: number[]; density: number[] } } | null;
  /** The locked rule's evaluation at the reviewed look. */
  current: LookReview;
  decision: LookDecision;
  /** This look and every earlier locked look, in order: the predictive probability line over looks. */
  history: LookReview[];
  ruleKind: MonitoringRule["kind"];
  plannedLooks: number[];
  boundaries: BoundaryRow[];
  /** Each look's observation against the boundaries at its actual evaluable count (and at the planned size). */
  observedBoundaries: ObservedBoundaryRow[];
  /** Cumulative responders (two arms: experimental) against evaluable patients (per arm), look by look. */
  observedPath: { lookNumber: number; n: number; responders: number }[];
  safety: SafetyReview | null;
  sensitivity: SensitivityRow[];
};

export type ReproducibilityRecord = {
  kind: "cairn.closed-review";
  engineVersion: string;
  generatedAt: string;
  inputs: { design: Design; arms: ReviewArm[]; looks: ReviewLook[]; analysisId: number; credibleLevel: number; gridPoints: number };
  outputs: Review;
};

/**
 * Sceptical prior: centred on the uninteresting rate (p0 for one arm; the assumed control rate for
 * both arms of a two-arm trial, i.e. no difference expected) with an effective sample size of 10%
 * of the maximum (per-arm) sample size, at least 2 patients. It pulls the estimate towards "no
 * benefit" with the weight of a few patients, enough to show whether a conclusion rests on the
 * prior. The 10% choice is a convention of this product (common practice, no source).
 */
export function scepticalPrior(centre: number, nMax: number): PriorSpec {
  return { family: "informative", mean: centre, ess: Math.max(2, Math.round(0.1 * nMax)) };
}

const UNIFORM: PriorSpec = { family: "uniform" };

function describePrior(spec: PriorSpec): string {
  switch (spec.family) {
    case "uniform":
      return "Beta(1, 1)";
    case "jeffreys":
      return "Beta(0.5, 0.5)";
    case "beta":
      return `Beta(${spec.a}, ${spec.b})`;
    case "informative":
      return `Beta(${+(spec.mean * spec.ess).toFixed(4)}, ${+((1 - spec.mean) * spec.ess).toFixed(4)}) (mean ${spec.mean}, effective sample size ${spec.ess})`;
    case "robustMixture":
      return `${spec.weight} × Beta(mean ${spec.mean}, effective sample size ${spec.ess}) + ${+(1 - spec.weight).toFixed(4)} × Beta(1, 1)`;
  }
}

/** One arm's counts at one look, or a clear error naming what is missing. */
function countsFor(look: ReviewLook, arm: ReviewArm): ReviewArmCounts {
  const c = look.counts.find((x) => x.armId === arm.id);
  if (!c) throw new StatsDomainError("counts", `look ${look.lookNumber}`, `have no row for the arm "${arm.label}"`);
  return c;
}

function armsOfDesign(design: Design, arms: ReviewArm[]): { single?: ReviewArm; experimental?: ReviewArm; control?: ReviewArm } {
  if (design.arms === "single") {
    const single = arms.find((a) => a.role === "single");
    if (!single) throw new StatsDomainError("arms", arms.length, "must include the single arm of a single-arm design");
    return { single };
  }
  const experimental = arms.find((a) => a.role === "experimental");
  const control = arms.find((a) => a.role === "control");
  if (!experimental || !control) throw new StatsDomainError("arms", arms.length, "must include an experimental and a control arm for a two-arm design");
  return { experimental, control };
}

/** The safety rule's probability (fixed limit or uncertain standard plus margin) for toxicities among treated. */
function safetyProbability(rule: NonNullable<Design["safety"]>, toxicities: number, treated: number): number {
  return safetyProbabilityFromPosterior(rule, posteriorMixture(resolvePrior(rule.prior), toxicities, treated));
}

/**
 * The response rule is decided by the engine without the safety rule; the safety rule is then
 * applied here with its own denominator, the patients treated (evaluable for toxicity), because
 * the engine's look data carry a single n (the patients evaluable for response). Same order and
 * strictness as the engine: a safety signal outranks everything else, and a tie does not trigger.
 */
function withSafety(design: Design, response: LookEvaluation, toxicities: number | null, treated: number | null): LookEvaluation {
  const rule = design.safety;
  if (!rule) return response;
  if (toxicities === null || treated === null)
    throw new StatsDomainError("toxicities", toxicities, "and the number treated are required because the design has a safety rule");
  requireData(toxicities, treated);
  const prob = safetyProbability(rule, toxicities, treated);
  const words = `posterior probability that the toxicity rate exceeds ${safetyLimitPhrase(rule)} is ${prob.toFixed(3)}`;
  const among = `${toxicities} with toxicity among ${treated} treated patients (evaluable for toxicity)`;
  if (exceedsThreshold(prob, rule.thetaS))
    return {
      ...response,
      decision: { action: "stop", stop: "safety", reason: `Safety: ${words}, above the toxicity alarm level ${rule.thetaS} (${among}): the data favour stopping for safety.` },
      predictiveProbability: null,
      posteriorProbabilityMonitoring: null,
      safetyProbability: prob,
    };
  return {
    ...response,
    decision: { ...response.decision, reason: `${response.decision.reason} No safety signal: ${words}, not above the toxicity alarm level ${rule.thetaS} (${among}).` },
    safetyProbability: prob,
  };
}

function evaluateLook(design: Design, look: ReviewLook, roles: ReturnType<typeof armsOfDesign>): LookReview {
  const responseOnly = { ...design, safety: null } as Design;
  if (design.arms === "single") {
    const c = countsFor(look, roles.single!);
    const evaluation = withSafety(design, decideAtLook(responseOnly, { n: c.evaluable, responders: c.responders }), c.toxicities, c.treated);
    return { analysisId: look.analysisId, lookNumber: look.lookNumber, cutoffDate: look.cutoffDate, n: c.evaluable, nControl: null, responders: c.responders, respondersControl: null, treated: c.treated, toxicities: c.toxicities, plannedN: look.plannedN ?? null, evaluation };
  }
  const t = countsFor(look, roles.experimental!);
  const c = countsFor(look, roles.control!);
  const evaluation = withSafety(design, decideAtLook(responseOnly, { nT: t.evaluable, respondersT: t.responders, nC: c.evaluable, respondersC: c.responders }), t.toxicities, t.treated);
  return {
    analysisId: look.analysisId,
    lookNumber: look.lookNumber,
    cutoffDate: look.cutoffDate,
    n: t.evaluable,
    nControl: c.evaluable,
    responders: t.responders,
    respondersControl: c.responders,
    treated: t.treated,
    toxicities: t.toxicities,
    plannedN: look.plannedN ?? null,
    evaluation,
  };
}

function armReview(arm: ReviewArm, c: ReviewArmCounts, priorSpec: PriorSpec, p0: number | null, level: number, points: number): ArmReview {
  const prior = resolvePrior(priorSpec);
  const posterior = posteriorMixture(prior, c.responders, c.evaluable);
  return {
    armId: arm.id,
    label: arm.label,
    role: arm.role,
    enrolled: c.enrolled,
    treated: c.treated,
    evaluable: c.evaluable,
    pending: c.pending ?? 0,
    responders: c.responders,
    toxicities: c.toxicities,
    prior,
    posterior,
    summary: summarisePosterior(prior, c.responders, c.evaluable, level),
    probAboveP0: p0 === null ? null : mixtureSurvival(posterior, p0),
    clopperPearson: clopperPearson(c.responders, c.evaluable, level),
    wilson: wilson(c.responders, c.evaluable, level),
    curves: mixtureCurves(posterior, points),
    priorCurves: mixtureCurves(prior, points),
  };
}

/**
 * The boundary rows of a two-arm design read at one control count per look: the observed control
 * count where the look happened at its planned size, otherwise the count at the control arm's
 * latest observed rate, rounded ("projected").
 */
function twoArmBoundaryRows(table: ReturnType<typeof twoArmBoundaries>, history: LookReview[], current: LookReview): BoundaryRow[] {
  const rateC = current.nControl ? (current.respondersControl ?? 0) / current.nControl : 0;
  return table.response.map((row) => {
    const seen = history.find((h) => h.n === row.n && h.nControl === row.n);
    const xC = seen ? (seen.respondersControl as number) : Math.min(row.n, Math.max(0, Math.round(rateC * row.n)));
    return { n: row.n, final: row.final, futilityMax: row.futilityMaxT[xC], efficacyMin: row.efficacyMinT[xC], controlResponders: xC, controlBasis: seen ? "observed" : "projected" };
  });
}

/**
 * A single-arm response boundary at any evaluable count n (planned look or not), computed exactly
 * as the planned table is: the same monitoring statistic at every count 0..n, read by the same rule.
 * At n = nMax the final success rule applies.
 */
export function singleArmBoundaryAtN(design: SingleArmDesign, n: number): ResponseBoundary {
  const { prior } = validateSingleArmDesign(design);
  if (!Number.isInteger(n) || n < 0 || n > design.nMax) throw new StatsDomainError("n", n, `must be an integer from 0 to nMax = ${design.nMax}`);
  const success = singleArmFinalSuccess(prior, design.nMax, design.p0, design.rule.thetaT);
  if (n === design.nMax) return finalBoundaryFromSuccess(success);
  const [stat] = singleArmInterimStatistics(prior, design, [n], success);
  return boundaryFromStatistics(n, stat, design.rule);
}

/**
 * The experimental arm's boundary at nT patients, given xC responders of nC in the control arm
 * (the arms may hold different numbers of patients). Interim: the design's monitoring statistic
 * (PP or P(pT - pC > delta)) at every xT = 0..nT; both arms at nMaxPerArm: the final rule.
 */
export function twoArmBoundaryAtN(design: TwoArmDesign, nT: number, nC: number, xC: number): ResponseBoundary {
  const { priorT, priorC } = validateTwoArmDesign(design);
  const N = design.nMaxPerArm;
  for (const [name, v] of [["nT", nT], ["nC", nC]] as const)
    if (!Number.isInteger(v) || v < 0 || v > N) throw new StatsDomainError(name, v, `must be an integer from 0 to nMaxPerArm = ${N}`);
  if (!Number.isInteger(xC) || xC < 0 || xC > nC) throw new StatsDomainError("xC", xC, `must be an integer from 0 to nC = ${nC}`);
  const finalRule = twoArmFinalRuleForDesign(design);
  if (nT === N && nC === N) {
    const t = finalRule.minSuccessT[xC];
    return { n: N, final: true, futilityMax: t > 0 ? t - 1 : null, efficacyMin: t <= N ? t : null };
  }
  const stat = new Float64Array(nT + 1);
  const postC = posteriorMixture(priorC, xC, nC);
  for (let xT = 0; xT <= nT; xT++)
    stat[xT] =
      design.rule.kind === "predictive"
        ? predictiveProbabilityTwoArm({ priorT, priorC, xT, nT, xC, nC, finalRule })
        : probDifferenceExceeds(posteriorMixture(priorT, xT, nT), postC, design.delta);
  return boundaryFromStatistics(nT, stat, design.rule);
}

function regionOf(x: number, b: ResponseBoundary): ObservedBoundaryRow["region"] {
  if (b.efficacyMin !== null && x >= b.efficacyMin) return "efficacy";
  if (b.futilityMax !== null && x <= b.futilityMax) return "futility";
  return "continue";
}

function observedBoundaryRows(design: Design, history: LookReview[], planned: BoundaryRow[]): ObservedBoundaryRow[] {
  return history.map((h) => {
    const b = design.arms === "single" ? singleArmBoundaryAtN(design, h.n) : twoArmBoundaryAtN(design, h.n, h.nControl as number, h.respondersControl as number);
    const p = h.plannedN === null ? undefined : planned.find((r) => r.n === h.plannedN);
    return {
      lookNumber: h.lookNumber,
      plannedN: h.plannedN,
      n: h.n,
      nControl: h.nControl,
      final: b.final,
      responders: h.responders,
      controlResponders: h.respondersControl,
      futilityMax: b.futilityMax,
      efficacyMin: b.efficacyMin,
      planned: p ? { n: p.n, futilityMax: p.futilityMax, efficacyMin: p.efficacyMin } : null,
      region: regionOf(h.responders, b),
    };
  });
}

function safetyReview(design: Design, history: LookReview[], current: LookReview, level: number, points: number, boundary: SafetyBoundary[] | null): SafetyReview | null {
  const rule = design.safety;
  if (!rule) return null;
  if (current.toxicities === null || current.treated === null)
    throw new StatsDomainError("toxicities", current.toxicities, "and the number treated are required at this look because the design has a safety rule");
  const prior = resolvePrior(rule.prior);
  const posterior = posteriorMixture(prior, current.toxicities, current.treated);
  const probAboveLimit = safetyProbabilityFromPosterior(rule, posterior);
  const seen = history.filter((h): h is LookReview & { toxicities: number; treated: number } => h.toxicities !== null && h.treated !== null);
  const atActual = safetyBoundaries(rule, seen.map((h) => h.treated));
  return {
    qmax: rule.kind === "uncertainStandard" ? Math.min(1, Math.max(0, rule.standard.a / (rule.standard.a + rule.standard.b) + rule.margin)) : rule.qmax,
    limitLabel: safetyLimitPhrase(rule),
    thetaS: rule.thetaS,
    treated: current.treated,
    toxicities: current.toxicities,
    prior,
    posterior,
    summary: summarisePosterior(prior, current.toxicities, current.treated, level),
    probAboveLimit,
    crossed: exceedsThreshold(probAboveLimit, rule.thetaS),
    boundary: boundary ?? [],
    observedPath: seen.map((h) => ({ lookNumber: h.lookNumber, n: h.treated, toxicities: h.toxicities })),
    observed: seen.map((h, k) => {
      const p = h.plannedN === null ? undefined : boundary?.find((r) => r.n === h.plannedN);
      const t = atActual[k].toxicityMin;
      return {
        lookNumber: h.lookNumber,
        plannedN: h.plannedN,
        n: h.treated,
        toxicities: h.toxicities,
        toxicityMin: t,
        planned: p ? { n: p.n, toxicityMin: p.toxicityMin } : null,
        crossed: t !== null && (h.toxicities) >= t,
      };
    }),
    curves: mixtureCurves(posterior, points),
  };
}

function sensitivity(design: Design, current: LookReview, roles: ReturnType<typeof armsOfDesign>, level: number): SensitivityRow[] {
  if (design.arms === "single") {
    const d: SingleArmDesign = design;
    const rows: Array<[SensitivityRow["key"], string, PriorSpec]> = [
      ["design", "Design prior", d.prior],
      ["uniform", "Uniform prior", UNIFORM],
      ["sceptical", "Sceptical prior", scepticalPrior(d.p0, d.nMax)],
    ];
    return rows.map(([key, label, spec]) => {
      const prior = resolvePrior(spec);
      const posterior = posteriorMixture(prior, current.responders, current.n);
      const pp =
        current.n < d.nMax
          ? predictiveProbabilitySingleArm({ prior, x: current.responders, n: current.n, nMax: d.nMax, p0: d.p0, thetaT: d.rule.thetaT, finalSuccess: singleArmFinalSuccess(prior, d.nMax, d.p0, d.rule.thetaT) })
          : null;
      return {
        key,
        label,
        description: describePrior(spec),
        arms: [{ armId: roles.single!.id, role: "single" as const, prior, posterior, summary: summarisePosterior(prior, current.responders, current.n, level), probAboveP0: mixtureSurvival(posterior, d.p0) }],
        probDifferenceExceeds: null,
        predictiveProbability: pp,
      };
    });
  }
  const d: TwoArmDesign = design;
  const sceptical = scepticalPrior(d.controlRate, d.nMaxPerArm);
  const rows: Array<[SensitivityRow["key"], string, PriorSpec, PriorSpec]> = [
    ["design", "Design priors", d.priorT, d.priorC],
    ["uniform", "Uniform priors", UNIFORM, UNIFORM],
    ["sceptical", "Sceptical priors", sceptical, sceptical],
  ];
  return rows.map(([key, label, specT, specC]) => {
    const [priorT, priorC] = [resolvePrior(specT), resolvePrior(specC)];
    const [xC, nC] = [current.respondersControl as number, current.nControl as number];
    const postT = posteriorMixture(priorT, current.responders, current.n);
    const postC = posteriorMixture(priorC, xC, nC);
    return {
      key,
      label,
      description: specT === specC ? `both arms ${describePrior(specT)}` : `experimental ${describePrior(specT)}; control ${describePrior(specC)}`,
      arms: [
        { armId: roles.experimental!.id, role: "experimental" as const, prior: priorT, posterior: postT, summary: summarisePosterior(priorT, current.responders, current.n, level), probAboveP0: null },
        { armId: roles.control!.id, role: "control" as const, prior: priorC, posterior: postC, summary: summarisePosterior(priorC, xC, nC, level), probAboveP0: null },
      ],
      probDifferenceExceeds: probDifferenceExceeds(postT, postC, d.delta),
      predictiveProbability: null,
    };
  });
}

/**
 * The closed review of one analysis.
 * @throws StatsDomainError when the analysis is not among the looks, a count row is missing, or a
 *   count breaks the design (for example more patients than nMax).
 */
export function computeReview(input: ReviewInput): Review {
  const level = input.credibleLevel ?? 0.95;
  const points = input.gridPoints ?? 201;
  if (!(level > 0 && level < 1)) throw new StatsDomainError("credibleLevel", level, "must lie strictly between 0 and 1");
  if (!Number.isInteger(points) || points < 11 || points > 2001) throw new StatsDomainError("gridPoints", points, "must be an integer from 11 to 2001");
  const design = input.design;
  const roles = armsOfDesign(design, input.arms);
  const target = input.looks.find((l) => l.analysisId === input.analysisId);
  if (!target) throw new StatsDomainError("analysisId", input.analysisId, "is not among the locked looks given");
  const looks = input.looks.filter((l) => l.lookNumber <= target.lookNumber).sort((a, b) => a.lookNumber - b.lookNumber);
  const history = looks.map((l) => evaluateLook(design, l, roles));
  const current = history[history.length - 1];

  let arms: ArmReview[];
  let difference: Review["difference"] = null;
  let boundaries: BoundaryRow[];
  let safetyBoundary: SafetyBoundary[] | null;
  let plannedLooks: number[];
  if (design.arms === "single") {
    arms = [armReview(roles.single!, countsFor(target, roles.single!), design.prior, design.p0, level, points)];
    const b = singleArmBoundaries(design);
    boundaries = b.response;
    safetyBoundary = b.safety;
    plannedLooks = expandLooks(design.looks, design.nMax);
  } else {
    const t = armReview(roles.experimental!, countsFor(target, roles.experimental!), design.priorT, null, level, points);
    const c = armReview(roles.control!, countsFor(target, roles.control!), design.priorC, null, level, points);
    arms = [t, c];
    difference = { delta: design.delta, probExceeds: probDifferenceExceeds(t.posterior, c.posterior, design.delta), grid: differenceDensityGrid(t.posterior, c.posterior, points) };
    const table = twoArmBoundaries(design);
    boundaries = twoArmBoundaryRows(table, history, current);
    safetyBoundary = table.safety;
    plannedLooks = expandLooks(design.looks, design.nMaxPerArm);
  }

  return {
    analysisId: target.analysisId,
    lookNumber: target.lookNumber,
    cutoffDate: target.cutoffDate,
    designKind: design.arms,
    credibleLevel: level,
    reference: design.arms === "single" ? { kind: "p0", value: design.p0 } : { kind: "control", armId: roles.control!.id },
    arms,
    difference,
    current,
    decision: current.evaluation.decision,
    history,
    ruleKind: design.rule.kind,
    plannedLooks,
    boundaries,
    observedBoundaries: observedBoundaryRows(design, history, boundaries),
    observedPath: history.map((h) => ({ lookNumber: h.lookNumber, n: h.n, responders: h.responders })),
    safety: safetyReview(design, history, current, level, points, safetyBoundary),
    sensitivity: sensitivity(design, current, roles, level),
  };
}

/** The review plus everything needed to reproduce it: inputs, engine version, time. */
export function reproducibilityRecord(input: ReviewInput, review: Review = computeReview(input)): ReproducibilityRecord {
  return {
    kind: "cairn.closed-review",
    engineVersion: ENGINE_VERSION,
    generatedAt: input.generatedAt,
    inputs: {
      design: input.design,
      arms: input.arms,
      looks: input.looks.filter((l) => l.lookNumber <= review.lookNumber),
      analysisId: input.analysisId,
      credibleLevel: review.credibleLevel,
      gridPoints: input.gridPoints ?? 201,
    },
    outputs: review,
  };
}

/**
 * The posterior of one arm at one look, without the rest of the review (the interval question asks
 * for it as the reviewer types, so it must be cheap).
 */
export function armPosterior(design: Design, arms: ReviewArm[], look: ReviewLook, armId: number): MixtureBeta {
  const arm = arms.find((a) => a.id === armId);
  if (!arm) throw new StatsDomainError("arm", armId, "is not an arm of this trial");
  const spec = design.arms === "single" ? design.prior : arm.role === "control" ? design.priorC : design.priorT;
  const c = countsFor(look, arm);
  return posteriorMixture(resolvePrior(spec), c.responders, c.evaluable);
}

/** P(lo < p <= hi | data) for one arm's posterior; 0 <= lo < hi <= 1. */
export function intervalProbabilityOf(posterior: MixtureBeta, lo: number, hi: number): number {
  if (!(lo >= 0 && hi <= 1 && lo < hi)) throw new StatsDomainError("lo, hi", `${lo}, ${hi}`, "must satisfy 0 <= lo < hi <= 1");
  return mixtureIntervalProbability(posterior, lo, hi);
}
