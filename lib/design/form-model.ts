/**
 * The design form's editable state and its mapping to and from a Design. Inputs are kept as the
 * text the statistician typed (so a half-typed number is not lost); `formToCandidate` turns them
 * into numbers for the zod design schema, which is the one judge of validity, client and server.
 */
import type { Design, MonitoringRule, PriorSpec } from "@/lib/stats/types";
import { singleArmDesignSchema, twoArmDesignSchema } from "@/lib/stats/design-schema";

/** The design studio computes its preview once the inputs have been still this long (ms). */
export const PREVIEW_DEBOUNCE_MS = 400;

export type PriorFamily = PriorSpec["family"];
export type PriorForm = { family: PriorFamily; a: string; b: string; mean: string; ess: string; weight: string };

export type DesignForm = {
  arms: "single" | "two";
  prior: PriorForm;
  priorT: PriorForm;
  priorC: PriorForm;
  p0: string;
  p1: string;
  delta: string;
  nMax: string;
  controlRate: string;
  experimentalRate: string;
  nMaxPerArm: string;
  looksKind: "list" | "every";
  looksList: string;
  looksFirst: string;
  looksEvery: string;
  ruleKind: MonitoringRule["kind"];
  /** Single arm, uncertain-standard rule: the standard rate's Beta(aS, bS). */
  standardA: string;
  standardB: string;
  thetaT: string;
  futilityThreshold: string;
  efficacyStopping: boolean;
  efficacyThreshold: string;
  safetyOn: boolean;
  /** "fixedLimit": P(q > qmax) > θS; "uncertainStandard": P(q > qS + margin) > θS with qS ~ Beta(aS, bS). */
  safetyKind: "fixedLimit" | "uncertainStandard";
  qmax: string;
  safetyStandardA: string;
  safetyStandardB: string;
  safetyMargin: string;
  thetaS: string;
  safetyPrior: PriorForm;
};

export const PRIOR_FAMILY_LABELS: Record<PriorFamily, string> = {
  uniform: "Uniform, Beta(1, 1)",
  jeffreys: "Jeffreys, Beta(0.5, 0.5)",
  beta: "Beta(a, b)",
  informative: "Informative: mean and effective sample size",
  robustMixture: "Robust mixture: informative part plus a vague Beta(1, 1)",
};

const str = (v: number | null | undefined) => (v === null || v === undefined ? "" : String(v));

function priorToForm(p: PriorSpec): PriorForm {
  const f: PriorForm = { family: p.family, a: "1", b: "1", mean: "0.3", ess: "10", weight: "0.8" };
  if (p.family === "beta") Object.assign(f, { a: str(p.a), b: str(p.b) });
  if (p.family === "informative") Object.assign(f, { mean: str(p.mean), ess: str(p.ess) });
  if (p.family === "robustMixture") Object.assign(f, { mean: str(p.mean), ess: str(p.ess), weight: str(p.weight) });
  return f;
}

/** A starting design for a new trial (values chosen as a plausible phase II setting, common practice, no source). */
export function defaultDesign(arms: "single" | "two"): Design {
  const rule = { kind: "predictive" as const, thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null };
  if (arms === "single")
    return { arms, prior: { family: "uniform" }, p0: 0.2, p1: 0.4, delta: 0, nMax: 40, looks: { kind: "every", first: 10, every: 10 }, rule, safety: null };
  return {
    arms,
    priorT: { family: "uniform" },
    priorC: { family: "uniform" },
    controlRate: 0.3,
    experimentalRate: 0.5,
    delta: 0,
    nMaxPerArm: 40,
    looks: { kind: "every", first: 20, every: 10 },
    rule: { ...rule, thetaT: 0.95, futilityThreshold: 0.1 },
    safety: null,
  };
}

export function designToForm(d: Design): DesignForm {
  const blankPrior = priorToForm({ family: "uniform" });
  const base = {
    prior: blankPrior,
    priorT: blankPrior,
    priorC: blankPrior,
    p0: "0.2",
    p1: "0.4",
    delta: str(d.delta),
    nMax: "40",
    controlRate: "0.3",
    experimentalRate: "0.5",
    nMaxPerArm: "40",
    looksKind: d.looks.kind,
    looksList: d.looks.kind === "list" ? d.looks.sizes.join(", ") : "",
    looksFirst: d.looks.kind === "every" ? str(d.looks.first) : "10",
    looksEvery: d.looks.kind === "every" ? str(d.looks.every) : "10",
    ruleKind: d.rule.kind,
    standardA: d.rule.standard ? str(d.rule.standard.a) : "20",
    standardB: d.rule.standard ? str(d.rule.standard.b) : "80",
    thetaT: str(d.rule.thetaT),
    futilityThreshold: str(d.rule.futilityThreshold),
    efficacyStopping: d.rule.efficacyStopping,
    efficacyThreshold: d.rule.efficacyThreshold === null ? "0.99" : str(d.rule.efficacyThreshold),
    safetyOn: d.safety !== null,
    safetyKind: (d.safety?.kind === "uncertainStandard" ? "uncertainStandard" : "fixedLimit") as DesignForm["safetyKind"],
    qmax: d.safety && d.safety.kind !== "uncertainStandard" ? str(d.safety.qmax) : "0.3",
    safetyStandardA: d.safety?.kind === "uncertainStandard" ? str(d.safety.standard.a) : "20",
    safetyStandardB: d.safety?.kind === "uncertainStandard" ? str(d.safety.standard.b) : "80",
    safetyMargin: d.safety?.kind === "uncertainStandard" ? str(d.safety.margin) : "0.1",
    thetaS: d.safety ? str(d.safety.thetaS) : "0.9",
    safetyPrior: d.safety ? priorToForm(d.safety.prior) : priorToForm({ family: "beta", a: 0.6, b: 1.4 }),
  };
  if (d.arms === "single")
    return { ...base, arms: "single", prior: priorToForm(d.prior), p0: str(d.p0), p1: str(d.p1), nMax: str(d.nMax) };
  return {
    ...base,
    arms: "two",
    priorT: priorToForm(d.priorT),
    priorC: priorToForm(d.priorC),
    controlRate: str(d.controlRate),
    experimentalRate: str(d.experimentalRate),
    nMaxPerArm: str(d.nMaxPerArm),
  };
}

/** Text to number; blank or malformed text becomes NaN, which the schema reports as "must be a number". */
export function num(s: string): number {
  const t = s.trim();
  if (t === "") return Number.NaN;
  return Number(t);
}

function priorFromForm(f: PriorForm): unknown {
  switch (f.family) {
    case "uniform":
    case "jeffreys":
      return { family: f.family };
    case "beta":
      return { family: "beta", a: num(f.a), b: num(f.b) };
    case "informative":
      return { family: "informative", mean: num(f.mean), ess: num(f.ess) };
    case "robustMixture":
      return { family: "robustMixture", mean: num(f.mean), ess: num(f.ess), weight: num(f.weight) };
  }
}

/** Splits "10, 20 30;40" into numbers; anything that is not a number stays NaN for the schema to report. */
export function parseLookList(s: string): number[] {
  return s
    .split(/[\s,;]+/)
    .filter((t) => t !== "")
    .map((t) => Number(t));
}

/** The candidate object the zod design schema judges. */
export function formToCandidate(f: DesignForm): unknown {
  const looks = f.looksKind === "list" ? { kind: "list", sizes: parseLookList(f.looksList) } : { kind: "every", first: num(f.looksFirst), every: num(f.looksEvery) };
  const rule: Record<string, unknown> = {
    kind: f.ruleKind,
    thetaT: num(f.thetaT),
    futilityThreshold: num(f.futilityThreshold),
    efficacyStopping: f.efficacyStopping,
    efficacyThreshold: f.efficacyStopping ? num(f.efficacyThreshold) : null,
  };
  // Only a single arm carries its own standard; two arms use the control arm's posterior.
  if (f.ruleKind === "uncertainStandard" && f.arms === "single") rule.standard = { a: num(f.standardA), b: num(f.standardB) };
  const safety = !f.safetyOn
    ? null
    : f.safetyKind === "uncertainStandard"
      ? { kind: "uncertainStandard", standard: { a: num(f.safetyStandardA), b: num(f.safetyStandardB) }, margin: num(f.safetyMargin), prior: priorFromForm(f.safetyPrior), thetaS: num(f.thetaS) }
      : { qmax: num(f.qmax), prior: priorFromForm(f.safetyPrior), thetaS: num(f.thetaS) };
  const delta = f.delta.trim() === "" ? 0 : num(f.delta);
  if (f.arms === "single") return { arms: "single", prior: priorFromForm(f.prior), p0: num(f.p0), p1: num(f.p1), delta, nMax: num(f.nMax), looks, rule, safety };
  return {
    arms: "two",
    priorT: priorFromForm(f.priorT),
    priorC: priorFromForm(f.priorC),
    controlRate: num(f.controlRate),
    experimentalRate: num(f.experimentalRate),
    delta,
    nMaxPerArm: num(f.nMaxPerArm),
    looks,
    rule,
    safety,
  };
}

/**
 * Where a schema issue is shown: the form field key for a design path (zod issue path).
 * Prior paths keep their prefix ("prior.a", "priorT.mean", "safetyPrior.ess").
 */
export function fieldForIssuePath(path: readonly PropertyKey[]): string {
  const [head, second] = path.map(String);
  switch (head) {
    case "looks":
      if (second === "first") return "looksFirst";
      if (second === "every") return "looksEvery";
      return "looks";
    case "rule":
      if (second === "kind") return "ruleKind";
      if (second === "standard") return path[2] === "b" ? "standardB" : "standardA";
      return second ?? "rule";
    case "safety":
      if (second === "prior") return path[2] === undefined ? "safetyPrior" : `safetyPrior.${String(path[2])}`;
      if (second === "standard") return path[2] === "b" ? "safetyStandardB" : "safetyStandardA";
      if (second === "margin") return "safetyMargin";
      return second ?? "safety";
    case "prior":
    case "priorT":
    case "priorC":
      return second === undefined ? head : `${head}.${second}`;
    default:
      return head ?? "form";
  }
}

export type FieldErrors = Record<string, string>;

/** First message per field, from zod issues (client-side safeParse or a 422 response). */
export function issuesToFieldErrors(issues: readonly { path: readonly PropertyKey[] | string; message: string }[]): FieldErrors {
  const out: FieldErrors = {};
  for (const i of issues) {
    const path = typeof i.path === "string" ? (i.path === "" ? [] : i.path.split(".")) : i.path;
    const key = fieldForIssuePath(path);
    if (!(key in out)) out[key] = friendlier(i.message);
  }
  return out;
}

/** zod's own wording for a union mismatch or NaN reads like a developer message; say it plainly. */
function friendlier(message: string): string {
  if (/expected number, received NaN/i.test(message)) return "Enter a number.";
  if (/Invalid input/i.test(message)) return "This value is not valid.";
  return message;
}

/**
 * Validates a candidate with the schema for its own arm count, so a bad field is reported at its
 * path (a plain union would report "no option matched" instead).
 */
export function validateDesignCandidate(candidate: unknown): { ok: true; design: Design } | { ok: false; errors: FieldErrors } {
  const arms = (candidate as { arms?: unknown } | null)?.arms;
  const schema = arms === "two" ? twoArmDesignSchema : singleArmDesignSchema;
  const r = schema.safeParse(candidate);
  if (r.success) return { ok: true, design: r.data as Design };
  return { ok: false, errors: issuesToFieldErrors(r.error.issues) };
}
