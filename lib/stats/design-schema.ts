/**
 * zod schema for a Design (lib/stats/types.ts), used at every edge that accepts one: the design
 * API, the design form's server action, and when a stored spec is read back.
 */
import { z } from "zod";
import type { Design } from "./types";

const prob = (what: string) =>
  z.number({ message: `${what} must be a number.` }).gt(0, `${what} must be greater than 0.`).lt(1, `${what} must be less than 1.`);
const threshold = (what: string) =>
  z.number({ message: `${what} must be a number.` }).min(0, `${what} must be at least 0.`).max(1, `${what} must be at most 1.`);
const count = (what: string, max = 2000) =>
  z.number({ message: `${what} must be a number.` }).int(`${what} must be a whole number.`).min(1, `${what} must be at least 1.`).max(max, `${what} can be at most ${max}.`);

const priorSpecSchema = z.discriminatedUnion("family", [
  z.object({ family: z.literal("uniform") }),
  z.object({ family: z.literal("jeffreys") }),
  z.object({
    family: z.literal("beta"),
    a: z.number().gt(0, "a must be greater than 0.").max(10_000, "a can be at most 10000."),
    b: z.number().gt(0, "b must be greater than 0.").max(10_000, "b can be at most 10000."),
  }),
  z.object({ family: z.literal("informative"), mean: prob("The prior mean"), ess: z.number().gt(0, "The effective sample size must be greater than 0.").max(10_000, "The effective sample size can be at most 10000.") }),
  z.object({
    family: z.literal("robustMixture"),
    mean: prob("The prior mean"),
    ess: z.number().gt(0, "The effective sample size must be greater than 0.").max(10_000, "The effective sample size can be at most 10000."),
    weight: threshold("The mixture weight"),
  }),
]);

const lookScheduleSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("list"), sizes: z.array(count("A look size")).min(1, "List at least one look.").max(500, "At most 500 looks.") }),
  z.object({ kind: z.literal("every"), first: count("The first look"), every: count("The look spacing") }),
]);

const standardRatePriorSchema = z.object({
  a: z.number({ message: "aS must be a number." }).gt(0, "aS must be greater than 0.").max(100_000, "aS can be at most 100000."),
  b: z.number({ message: "bS must be a number." }).gt(0, "bS must be greater than 0.").max(100_000, "bS can be at most 100000."),
});

const monitoringRuleSchema = z
  .object({
    kind: z.enum(["predictive", "posterior", "uncertainStandard"]),
    thetaT: threshold("The final success threshold"),
    futilityThreshold: threshold("The futility threshold"),
    efficacyStopping: z.boolean(),
    efficacyThreshold: threshold("The efficacy threshold").nullable(),
    // Optional so that specs stored before the uncertain-standard rule still parse unchanged.
    standard: standardRatePriorSchema.nullable().optional(),
  })
  .refine((r) => !r.efficacyStopping || r.efficacyThreshold !== null, {
    message: "Give an efficacy threshold, or switch efficacy stopping off.",
    path: ["efficacyThreshold"],
  })
  .refine((r) => !r.efficacyStopping || r.efficacyThreshold === null || r.efficacyThreshold > r.futilityThreshold, {
    message: "The efficacy threshold must be above the futility threshold.",
    path: ["efficacyThreshold"],
  });

const margin = (what: string) =>
  z.number({ message: `${what} must be a number.` }).gt(-1, `${what} must be above -1.`).lt(1, `${what} must be below 1.`);

/**
 * Two forms in one object so that stored fixed-limit rules (no `kind`) parse to exactly what was
 * stored; the refinements require the fields each form needs.
 */
const safetyRuleSchema = z
  .object({
    kind: z.enum(["fixedLimit", "uncertainStandard"]).optional(),
    qmax: prob("The toxicity limit").optional(),
    standard: standardRatePriorSchema.optional(),
    margin: margin("The toxicity margin").optional(),
    prior: priorSpecSchema,
    thetaS: threshold("The safety threshold"),
  })
  .superRefine((s, ctx) => {
    if (s.kind === "uncertainStandard") {
      if (!s.standard) ctx.addIssue({ code: "custom", message: "Give the standard toxicity rate's Beta(aS, bS).", path: ["standard"] });
      if (s.margin === undefined) ctx.addIssue({ code: "custom", message: "Give the toxicity margin (0 for none).", path: ["margin"] });
    } else if (s.qmax === undefined) ctx.addIssue({ code: "custom", message: "Give the toxicity limit qmax.", path: ["qmax"] });
  });

const looksWithin = (nMax: number, looks: z.infer<typeof lookScheduleSchema>) =>
  looks.kind === "every" ? looks.first <= nMax : looks.sizes.every((s) => s <= nMax);

export const singleArmDesignSchema = z
  .object({
    arms: z.literal("single"),
    prior: priorSpecSchema,
    p0: prob("p0"),
    p1: prob("p1"),
    delta: z.number().min(-0.99).max(0.99).default(0),
    nMax: count("The maximum sample size", 1000),
    looks: lookScheduleSchema,
    rule: monitoringRuleSchema,
    safety: safetyRuleSchema.nullable().default(null),
  })
  .refine((d) => d.p1 > d.p0, { message: "p1 must be above p0.", path: ["p1"] })
  .refine((d) => d.rule.kind !== "uncertainStandard" || !!d.rule.standard, {
    message: "Give the standard rate's Beta(aS, bS) for the uncertain-standard rule.",
    path: ["rule", "standard"],
  })
  .refine((d) => looksWithin(d.nMax, d.looks), { message: "Every look must be at or below the maximum sample size.", path: ["looks"] });

export const twoArmDesignSchema = z
  .object({
    arms: z.literal("two"),
    priorT: priorSpecSchema,
    priorC: priorSpecSchema,
    controlRate: prob("The control rate"),
    experimentalRate: prob("The experimental rate"),
    delta: z.number().gt(-1, "delta must be above -1.").lt(1, "delta must be below 1."),
    nMaxPerArm: count("The maximum sample size per arm", 400),
    looks: lookScheduleSchema,
    rule: monitoringRuleSchema,
    safety: safetyRuleSchema.nullable().default(null),
  })
  .refine((d) => !d.rule.standard, {
    message: "In a two-arm design the control arm's posterior is the standard; leave the standard rate out.",
    path: ["rule", "standard"],
  })
  .refine((d) => looksWithin(d.nMaxPerArm, d.looks), { message: "Every look must be at or below the maximum sample size per arm.", path: ["looks"] });

const designSchema = z.union([singleArmDesignSchema, twoArmDesignSchema]);

/** Parses a stored or submitted design; throws ZodError on anything else. */
export function parseDesign(input: unknown): Design {
  return designSchema.parse(input) as Design;
}
