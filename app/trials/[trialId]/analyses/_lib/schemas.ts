/**
 * Request schemas for interim data entry, shared by the route handlers (authoritative) and the
 * browser forms (instant feedback). Pure: no server imports.
 */
import { z } from "zod";
import { isIsoDate } from "@/lib/csv/patient-outcomes";

/** The largest count accepted for one arm at one look; far above any phase II trial. */
export const MAX_ARM_COUNT = 100_000;

export const rowVersionSchema = z.coerce
  .number({ message: "The version of the look you edited is missing; reload the page." })
  .int("The version of the look you edited is missing; reload the page.")
  .min(1, "The version of the look you edited is missing; reload the page.");

export const cutoffDateSchema = z
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

export type CountsContext = { armIds: number[]; safetyRule: boolean };

/**
 * Counts for every arm of the trial, once each, with responders <= evaluable <= enrolled and
 * toxicities <= enrolled; toxicities are required exactly when the design has a safety rule.
 */
export function armCountsSchema(ctx: CountsContext) {
  const arm = z
    .object({
      armId: z.coerce.number().int().positive(),
      enrolled: countCell("the number enrolled"),
      evaluable: countCell("the number evaluable"),
      responders: countCell("the number of responders"),
      toxicities: ctx.safetyRule
        ? countCell("the number with toxicity")
        : z.preprocess((v) => (v === "" || v === undefined ? null : v), z.null({ message: "This design has no safety rule, so toxicities are not recorded." })),
    })
    .superRefine((c, z2) => {
      if (c.evaluable > c.enrolled)
        z2.addIssue({ code: "custom", path: ["evaluable"], message: `Evaluable (${c.evaluable}) cannot exceed enrolled (${c.enrolled}).` });
      if (c.responders > c.evaluable)
        z2.addIssue({ code: "custom", path: ["responders"], message: `Responders (${c.responders}) cannot exceed evaluable (${c.evaluable}).` });
      if (typeof c.toxicities === "number" && c.toxicities > c.enrolled)
        z2.addIssue({ code: "custom", path: ["toxicities"], message: `Patients with toxicity (${c.toxicities}) cannot exceed enrolled (${c.enrolled}).` });
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
export type SaveCountsInput = z.infer<ReturnType<typeof saveCountsSchema>>;

export const openLookSchema = z.object({ rowVersion: rowVersionSchema, cutoffDate: cutoffDateSchema });

export const lockAnalysisSchema = z.object({
  rowVersion: rowVersionSchema,
  password: z.string({ message: "Enter your password to sign." }).min(1, "Enter your password to sign.").max(200, "That password is too long."),
});

export const reopenAnalysisSchema = z.object({
  rowVersion: rowVersionSchema,
  reason: z
    .string({ message: "Give the reason for the correction." })
    .trim()
    .min(10, "Give the reason for the correction (at least 10 characters).")
    .max(1000, "The reason can be at most 1000 characters."),
  /** Needed only to reopen a reviewed look: that correction is signed (the password is asked again). */
  password: z.string().min(1, "Enter your password to sign.").max(200, "That password is too long.").optional(),
});

export const uploadConfirmQuerySchema = z.object({
  rowVersion: rowVersionSchema,
  fileName: z.string().trim().max(200).optional(),
});

/** An issue list keyed by dotted path ("counts.0.responders"), for showing errors next to inputs. */
export function issuesByPath(issues: Array<{ path: string; message: string }>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const i of issues) if (!(i.path in out)) out[i.path] = i.message;
  return out;
}
