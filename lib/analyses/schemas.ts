/**
 * Request schemas for interim data entry, shared by the route handlers (authoritative) and the
 * browser forms (instant feedback). Pure: no server imports.
 */
import type { ArmCounts } from "@/lib/domain";
import { reasonSchema, rowVersionSchema, signingPasswordSchema } from "@/lib/schema-pieces";
import { z } from "zod";
import { isIsoDate } from "@/lib/csv/patient-outcomes";

/** The largest count accepted for one arm at one look; far above any phase II trial. */
const MAX_ARM_COUNT = 100_000;

export { rowVersionSchema };

const cutoffDateSchema = z
  .string({ message: "Enter the data cut-off date." })
  .trim()
  .min(1, "Enter the data cut-off date.")
  .refine(isIsoDate, { message: "Enter the data cut-off date as a real date (YYYY-MM-DD)." });

/** Form inputs arrive as text; the JSON API may send numbers. Empty text is "missing", not 0. */
const countCell = (what: string) =>
  z.preprocess(
    (v) => (typeof v === "string" ? (v.trim() === "" ? undefined : Number(v.trim())) : v),
    z
      .number({ message: `Enter ${what} as a whole number.` })
      .refine(Number.isFinite, { message: `Enter ${what} as a whole number.` })
      .refine(Number.isInteger, { message: `${cap(what)} must be a whole number.` })
      .refine((n) => n >= 0, { message: `${cap(what)} cannot be negative.` })
      .refine((n) => n <= MAX_ARM_COUNT, { message: `${cap(what)} can be at most ${MAX_ARM_COUNT}.` }),
  );

function cap(s: string) {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/**
 * What the counts are checked against: the trial's arms, whether the locked design has a safety
 * rule, and its maximum sample size (per arm for two arms; null when the caller has no design).
 */
type CountsContext = { armIds: number[]; safetyRule: boolean; maxPerArm?: number | null };

const absentWithoutSafety = (what: string) =>
  z.preprocess((v) => (v === "" || v === undefined ? null : v), z.null({ message: `This design has no safety rule, so ${what} are not recorded.` }));

/** One arm's counts, for the stored-row check at lock as well as for input. */
type ArmCountsShape = Omit<ArmCounts, "armId">;

/**
 * The within-look rules, shared by input validation and the lock-time check: responders <=
 * evaluable (for response) <= enrolled <= maximum sample size, toxicities <= treated (evaluable
 * for toxicity) <= enrolled. Each problem has the path of the field a user would correct.
 */
export function withinLookProblems(c: ArmCountsShape, maxPerArm: number | null | undefined): Array<{ path: string; message: string }> {
  const out: Array<{ path: string; message: string }> = [];
  if (maxPerArm !== null && maxPerArm !== undefined && c.enrolled > maxPerArm)
    out.push({ path: "enrolled", message: `Enrolled (${c.enrolled}) is above the locked design's maximum sample size for an arm (${maxPerArm}), which the design cannot analyse. If the trial has over-enrolled, amend the design first.` });
  if (c.evaluable > c.enrolled) out.push({ path: "evaluable", message: `Evaluable for response (${c.evaluable}) cannot exceed enrolled (${c.enrolled}).` });
  const pending = c.pending ?? 0;
  if (pending > 0 && c.evaluable + pending > c.enrolled)
    out.push({ path: "pending", message: `Evaluable (${c.evaluable}) plus pending (${pending}) cannot exceed enrolled (${c.enrolled}): a pending patient is enrolled and not yet evaluable.` });
  if (pending > 0 && maxPerArm !== null && maxPerArm !== undefined && c.evaluable + pending > maxPerArm)
    out.push({ path: "pending", message: `Evaluable (${c.evaluable}) plus pending (${pending}) is above the locked design's maximum sample size for an arm (${maxPerArm}).` });
  if (c.responders > c.evaluable) out.push({ path: "responders", message: `Responders (${c.responders}) cannot exceed evaluable for response (${c.evaluable}).` });
  if (c.treated !== null && c.treated > c.enrolled) out.push({ path: "treated", message: `Treated (${c.treated}) cannot exceed enrolled (${c.enrolled}).` });
  if (c.toxicities !== null && c.treated !== null && c.toxicities > c.treated)
    out.push({ path: "toxicities", message: `Patients with toxicity (${c.toxicities}) cannot exceed treated, the patients evaluable for toxicity (${c.treated}).` });
  return out;
}

/**
 * Counts for every arm of the trial, once each, meeting withinLookProblems; treated and
 * toxicities are required exactly when the design has a safety rule.
 */
export function armCountsSchema(ctx: CountsContext) {
  const arm = z
    .object({
      armId: z.coerce.number().int().positive(),
      enrolled: countCell("the number enrolled"),
      treated: ctx.safetyRule ? countCell("the number treated (evaluable for toxicity)") : absentWithoutSafety("treated counts"),
      evaluable: countCell("the number evaluable for response"),
      // Enrolled, will be evaluable, response not yet known at the cut-off; optional (empty or absent: 0).
      pending: z.preprocess((v) => (v === undefined || v === null || (typeof v === "string" && v.trim() === "") ? 0 : v), countCell("the number pending (response not yet known)")),
      responders: countCell("the number of responders"),
      toxicities: ctx.safetyRule ? countCell("the number with toxicity") : absentWithoutSafety("toxicities"),
    })
    .superRefine((c, z2) => {
      for (const p of withinLookProblems({ ...c, treated: c.treated ?? null, toxicities: c.toxicities ?? null, pending: c.pending }, ctx.maxPerArm))
        z2.addIssue({ code: "custom", path: [p.path], message: p.message });
    });
  return z.array(arm).superRefine((rows, z2) => {
    const ids = rows.map((r) => r.armId).sort((a, b) => a - b);
    const want = [...ctx.armIds].sort((a, b) => a - b);
    if (ids.length !== want.length || ids.some((id, i) => id !== want[i]))
      z2.addIssue({ code: "custom", message: "Give counts for each arm of the trial exactly once." });
  });
}

export function saveCountsSchema(ctx: CountsContext) {
  return z.object({
    rowVersion: rowVersionSchema,
    cutoffDate: cutoffDateSchema,
    counts: armCountsSchema(ctx),
    reason: z.string().trim().max(1000, "The reason can be at most 1000 characters.").optional(),
  });
}

export const openLookSchema = z.object({ rowVersion: rowVersionSchema, cutoffDate: cutoffDateSchema });

export const lockAnalysisSchema = z.object({
  rowVersion: rowVersionSchema,
  password: signingPasswordSchema,
});

export const reopenAnalysisSchema = z.object({
  rowVersion: rowVersionSchema,
  reason: reasonSchema("the correction"),
  /** Needed only to reopen a reviewed look: that correction is signed (the password is asked again). */
  password: signingPasswordSchema.optional(),
});

export const switchToCountLevelSchema = z.object({
  rowVersion: rowVersionSchema,
  reason: reasonSchema("switching to count-level entry"),
});

export const uploadConfirmQuerySchema = z.object({
  rowVersion: rowVersionSchema,
  fileName: z.string().trim().max(200).optional(),
});

