/**
 * Request bodies of the design API (app/api/trials/[trialId]/designs/..., design-preview,
 * calibrations). The design itself is parsed by `parseDesignForTrial` so that its issues carry
 * design paths ("rule.thetaT"), which the form shows next to the field.
 */
import { reasonSchema, rowVersionSchema } from "@/lib/schema-pieces";
import { z } from "zod";
import { singleArmDesignSchema, twoArmDesignSchema } from "@/lib/stats/design-schema";
import type { Design, TwoArmDesign } from "@/lib/stats/types";
import { expandLooks } from "@/lib/stats/looks";

const rowVersion = rowVersionSchema;

export const specBodySchema = z.object({ spec: z.unknown() });
export const updateDraftBodySchema = z.object({ spec: z.unknown(), rowVersion });
/** The lock body; the password is then checked with lib/auth/signature (signingPasswordSchema, confirmSigner). */
export const lockBodySchema = z.object({ password: z.unknown(), rowVersion });
export const amendBodySchema = z.object({
  reason: reasonSchema("the amendment", 5, 2000),
});

/** A design checked against the trial's arm count; ZodError (422) with design paths otherwise. */
export function parseDesignForTrial(spec: unknown, designType: "single" | "two"): Design {
  const arms = (spec as { arms?: unknown } | null)?.arms;
  if (arms !== designType) {
    throw new z.ZodError([
      { code: "custom", path: ["arms"], message: designType === "two" ? "This trial has two arms: the design must be a two-arm design." : "This trial has one arm: the design must be a single-arm design.", input: arms },
    ]);
  }
  return (designType === "two" ? twoArmDesignSchema : singleArmDesignSchema).parse(spec) as Design;
}

const thresholdValue = z.number({ message: "Enter a number." }).min(0, "Must be at least 0.").max(1, "Must be at most 1.");

/** An inclusive grid from..to by step on [0, 1]. */
const gridRangeSchema = z
  .object({ from: thresholdValue, to: thresholdValue, step: z.number({ message: "Enter a number." }).gt(0, "The step must be above 0.").max(1, "The step can be at most 1.") })
  .refine((r) => r.to >= r.from, { message: "'to' must be at least 'from'.", path: ["to"] })
  .refine((r) => Math.floor((r.to - r.from) / r.step + 1e-9) + 1 <= 200, { message: "At most 200 values per threshold.", path: ["step"] });

type GridRange = z.infer<typeof gridRangeSchema>;

/** The values of a grid range, rounded to 1e-9 so 0.1 + 0.05 steps do not drift. */
export function expandGrid(r: GridRange): number[] {
  const count = Math.floor((r.to - r.from) / r.step + 1e-9) + 1;
  return Array.from({ length: count }, (_, i) => Math.round((r.from + i * r.step) * 1e9) / 1e9);
}

/** The largest grid one calibration may search (keeps a job to tens of seconds on two cores). */
const MAX_CALIBRATION_POINTS = 20_000;

export const calibrationBodySchema = z
  .object({
    spec: z.unknown(),
    typeIErrorLimit: z.number({ message: "Enter a number." }).gt(0, "The type I error limit must be above 0.").lt(1, "The type I error limit must be below 1."),
    powerTarget: z.number({ message: "Enter a number." }).gt(0, "The power target must be above 0.").lt(1, "The power target must be below 1."),
    thetaT: gridRangeSchema,
    thetaL: gridRangeSchema,
    thetaU: gridRangeSchema.nullable().default(null),
    keep: z.number().int().min(1).max(50).default(10),
  })
  .refine((b) => expandGrid(b.thetaT).length * expandGrid(b.thetaL).length * (b.thetaU ? expandGrid(b.thetaU).length : 1) <= MAX_CALIBRATION_POINTS, {
    message: `The grid is too large: at most ${MAX_CALIBRATION_POINTS} combinations.`,
    path: ["thetaL"],
  });


/**
 * Work allowed in one two-arm search, in (grid points) x (sum over looks of the per-arm look size
 * squared): a two-arm point costs a joint recursion over the (xT, xC) square per control rate. A 40 x 40
 * grid at 100 per arm with a look every 10 is 6.2e7 and runs in about half a minute on the two-core demo
 * machine; the limit keeps a search to about a minute.
 */
const TWO_ARM_SEARCH_BUDGET = 1e8;

/** The largest number of grid points a two-arm search of this design may have. */
export function maxTwoArmSearchPoints(design: TwoArmDesign): number {
  const work = expandLooks(design.looks, design.nMaxPerArm).reduce((s, n) => s + n * n, 0);
  return Math.max(1, Math.floor(TWO_ARM_SEARCH_BUDGET / work));
}
