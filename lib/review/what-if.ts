/**
 * CLOSED: "what would it take?" and "what if?" for the look under review, from the same inputs as
 * the closed review (the locked design and the stored counts). Pure: nothing is read or saved here;
 * a what-if is a question, never data.
 *
 * What if: the reviewer supposes how many more patients are evaluable and how many of them respond
 * (per arm for two arms); the answer is the rule's verdict at those hypothetical cumulative counts,
 * computed by the engine exactly as at a real look (`decideAtLook`, the response rule only: a safety
 * rule is watched on its own counts and is not projected), with the predictive probability of
 * success and the boundaries at that count.
 */
import type { LookDecision, TwoArmDesign } from "@/lib/stats/types";
import { decideAtLook, twoArmFinalRuleForDesign, validateSingleArmDesign, validateTwoArmDesign } from "@/lib/stats/decision";
import { predictiveProbabilitySingleArm, predictiveProbabilityTwoArm } from "@/lib/stats/predictive";
import { expandLooks } from "@/lib/stats/looks";
import { StatsDomainError } from "@/lib/stats/validate";
import { singleArmWhatItTakes, twoArmWhatItTakes, type SingleArmWhatItTakes, type TwoArmWhatItTakes } from "@/lib/stats/what-it-takes";
import { pendingOutlookSingleArm, pendingOutlookTwoArm, type PendingCell, type PendingRow } from "@/lib/stats/pending";
import { singleArmBoundaryAtN, twoArmBoundaryAtN, type ReviewArmCounts, type ReviewInput } from "./compute-review";

/** The counts of one arm at the look under review: responders / evaluable / pending. */
type ArmNow = { armId: number; label: string; responders: number; evaluable: number; pending: number };

export type CountsNow = { arms: "single"; single: ArmNow } | { arms: "two"; experimental: ArmNow; control: ArmNow };

function arm(input: ReviewInput, role: "single" | "experimental" | "control"): ArmNow {
  const a = input.arms.find((r) => r.role === role);
  if (!a) throw new StatsDomainError("arms", role, "is missing from this trial");
  const look = input.looks.find((l) => l.analysisId === input.analysisId);
  if (!look) throw new StatsDomainError("analysisId", input.analysisId, "is not among the locked looks given");
  const c: ReviewArmCounts | undefined = look.counts.find((x) => x.armId === a.id);
  if (!c) throw new StatsDomainError("counts", `look ${look.lookNumber}`, `have no row for the arm "${a.label}"`);
  return { armId: a.id, label: a.label, responders: c.responders, evaluable: c.evaluable, pending: c.pending ?? 0 };
}

/** The look under review's counts per arm. */
function countsNow(input: ReviewInput): CountsNow {
  if (input.design.arms === "single") return { arms: "single", single: arm(input, "single") };
  return { arms: "two", experimental: arm(input, "experimental"), control: arm(input, "control") };
}

export function whatItTakesForReview(input: ReviewInput): SingleArmWhatItTakes | TwoArmWhatItTakes {
  const now = countsNow(input);
  if (input.design.arms === "single" && now.arms === "single")
    return singleArmWhatItTakes(input.design, { responders: now.single.responders, evaluable: now.single.evaluable, pending: now.single.pending });
  if (input.design.arms === "two" && now.arms === "two")
    return twoArmWhatItTakes(input.design, {
      respondersT: now.experimental.responders,
      evaluableT: now.experimental.evaluable,
      pendingT: now.experimental.pending,
      respondersC: now.control.responders,
      evaluableC: now.control.evaluable,
      pendingC: now.control.pending,
    });
  throw new StatsDomainError("design.arms", input.design.arms, "does not match the trial's arms");
}

/** How the predictive probability will move once the pending outcomes arrive (null when none is pending or at the final analysis). */
export type PendingOutlook = { arms: "single"; pending: number; rows: PendingRow[]; predictiveProbability: number } | { arms: "two"; pendingT: number; pendingC: number; cells: PendingCell[]; predictiveProbability: number };

export function pendingOutlookForReview(input: ReviewInput): PendingOutlook | null {
  const now = countsNow(input);
  const d = input.design;
  if (d.arms === "single" && now.arms === "single") {
    const { prior } = validateSingleArmDesign(d);
    const s = now.single;
    if (s.pending === 0 || s.evaluable >= d.nMax) return null;
    const r = pendingOutlookSingleArm({ prior, x: s.responders, n: s.evaluable, pending: s.pending, nMax: d.nMax, p0: d.p0, thetaT: d.rule.thetaT });
    return { arms: "single", pending: s.pending, ...r };
  }
  if (d.arms === "two" && now.arms === "two") {
    const { priorT, priorC } = validateTwoArmDesign(d);
    const [t, c] = [now.experimental, now.control];
    if (t.pending + c.pending === 0 || (t.evaluable >= d.nMaxPerArm && c.evaluable >= d.nMaxPerArm)) return null;
    const r = pendingOutlookTwoArm({ priorT, priorC, xT: t.responders, nT: t.evaluable, pendingT: t.pending, xC: c.responders, nC: c.evaluable, pendingC: c.pending, finalRule: twoArmFinalRuleForDesign(d) });
    return { arms: "two", pendingT: t.pending, pendingC: c.pending, ...r };
  }
  return null;
}

export type WhatIfQuery =
  | { arms: "single"; patients: number; responders: number }
  | { arms: "two"; patientsT: number; respondersT: number; patientsC: number; respondersC: number };

type WhatIfPoint = { n: number; responders: number; nControl: number | null; respondersControl: number | null };

export type WhatIfAnswer = {
  from: WhatIfPoint;
  to: WhatIfPoint;
  /** True when the hypothetical counts reach nMax (both arms for two arms): the final rule applies. */
  final: boolean;
  /** The planned look whose size the hypothetical count equals (null: between planned looks). */
  plannedLook: number | null;
  /** Predictive probability of success at the hypothetical counts (null at the final analysis). */
  predictiveProbability: number | null;
  /** The final rule's posterior probability at the hypothetical counts. */
  posteriorProbabilitySuccess: number;
  /** The posterior rules' monitoring probability (null for the predictive rule and at the final analysis). */
  posteriorProbabilityMonitoring: number | null;
  decision: LookDecision;
  /** The response boundary at the hypothetical count (two arms: the experimental arm's, at the hypothetical control count). */
  boundary: { n: number; futilityMax: number | null; efficacyMin: number | null };
  /** Pending patients at the look under review, among the hypothetical patients first. */
  pending: { single: number } | { experimental: number; control: number };
};

/** Checks one arm's hypothetical: whole numbers, at most the patients still to come, responders among them. */
function checkArm(what: string, patients: number, responders: number, remaining: number): void {
  for (const [name, v] of [[`${what}patients`, patients], [`${what}responders`, responders]] as const)
    if (!Number.isInteger(v) || v < 0) throw new StatsDomainError(name, v, "must be a whole number, 0 or more");
  if (patients > remaining) throw new StatsDomainError(`${what}patients`, patients, `must not exceed the ${remaining} patients still to come`);
  if (responders > patients) throw new StatsDomainError(`${what}responders`, responders, `must not exceed the ${patients} hypothetical patients`);
}

/**
 * The rule's answer at hypothetical counts after the look under review.
 * @throws StatsDomainError (422) for a count that is negative, not whole, above the patients still
 *   to come, or responders above the hypothetical patients.
 */
export function whatIf(input: ReviewInput, q: WhatIfQuery): WhatIfAnswer {
  const now = countsNow(input);
  const d = input.design;
  const responseOnly = { ...d, safety: null };
  if (d.arms === "single" && now.arms === "single" && q.arms === "single") {
    validateSingleArmDesign(d);
    const s = now.single;
    checkArm("", q.patients, q.responders, d.nMax - s.evaluable);
    const n = s.evaluable + q.patients;
    const x = s.responders + q.responders;
    const ev = decideAtLook({ ...responseOnly, arms: "single" } as typeof d, { n, responders: x });
    const b = singleArmBoundaryAtN(d, n);
    const pp = n < d.nMax ? (ev.predictiveProbability ?? predictiveProbabilitySingleArm({ prior: validateSingleArmDesign(d).prior, x, n, nMax: d.nMax, p0: d.p0, thetaT: d.rule.thetaT })) : null;
    const looks = expandLooks(d.looks, d.nMax);
    return {
      from: { n: s.evaluable, responders: s.responders, nControl: null, respondersControl: null },
      to: { n, responders: x, nControl: null, respondersControl: null },
      final: ev.final,
      plannedLook: looks.includes(n) ? n : null,
      predictiveProbability: pp,
      posteriorProbabilitySuccess: ev.posteriorProbabilitySuccess,
      posteriorProbabilityMonitoring: ev.posteriorProbabilityMonitoring,
      decision: ev.decision,
      boundary: { n, futilityMax: b.futilityMax, efficacyMin: b.efficacyMin },
      pending: { single: s.pending },
    };
  }
  if (d.arms === "two" && now.arms === "two" && q.arms === "two") {
    const { priorT, priorC } = validateTwoArmDesign(d);
    const [t, c] = [now.experimental, now.control];
    checkArm("experimental ", q.patientsT, q.respondersT, d.nMaxPerArm - t.evaluable);
    checkArm("control ", q.patientsC, q.respondersC, d.nMaxPerArm - c.evaluable);
    const nT = t.evaluable + q.patientsT;
    const nC = c.evaluable + q.patientsC;
    const xT = t.responders + q.respondersT;
    const xC = c.responders + q.respondersC;
    const ev = decideAtLook(responseOnly as TwoArmDesign, { nT, respondersT: xT, nC, respondersC: xC });
    const b = twoArmBoundaryAtN(d, nT, nC, xC);
    const pp = ev.final ? null : (ev.predictiveProbability ?? predictiveProbabilityTwoArm({ priorT, priorC, xT, nT, xC, nC, finalRule: twoArmFinalRuleForDesign(d) }));
    const looks = expandLooks(d.looks, d.nMaxPerArm);
    return {
      from: { n: t.evaluable, responders: t.responders, nControl: c.evaluable, respondersControl: c.responders },
      to: { n: nT, responders: xT, nControl: nC, respondersControl: xC },
      final: ev.final,
      plannedLook: nT === nC && looks.includes(nT) ? nT : null,
      predictiveProbability: pp,
      posteriorProbabilitySuccess: ev.posteriorProbabilitySuccess,
      posteriorProbabilityMonitoring: ev.posteriorProbabilityMonitoring,
      decision: ev.decision,
      boundary: { n: nT, futilityMax: b.futilityMax, efficacyMin: b.efficacyMin },
      pending: { experimental: t.pending, control: c.pending },
    };
  }
  throw new StatsDomainError("arms", q.arms, `do not match this ${d.arms === "single" ? "single-arm" : "two-arm"} trial: ask with ${d.arms === "single" ? "patients and responders" : "patientsT, respondersT, patientsC and respondersC"}`);
}

/** Everything the review page's "what it takes / what if" panel needs, computed once on the server. */
export function whatItTakesPanel(input: ReviewInput) {
  const takes = whatItTakesForReview(input);
  const now = countsNow(input);
  const d = input.design;
  const first = takes.looks[0];
  const nextAhead: { single: number } | { experimental: number; control: number } | null = !first
    ? null
    : "ahead" in first
      ? { single: first.ahead }
      : { experimental: first.aheadT, control: first.aheadC };
  return {
    takes,
    now,
    pending: pendingOutlookForReview(input),
    nextAhead,
    maxN: d.arms === "single" ? d.nMax : d.nMaxPerArm,
    rates: d.arms === "single" ? ({ arms: "single", p0: d.p0, p1: d.p1 } as const) : ({ arms: "two", controlRate: d.controlRate, experimentalRate: d.experimentalRate } as const),
  };
}
