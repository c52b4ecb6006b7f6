/** zod schema for the "New trial" form (FormData entries, so numbers arrive as text). */
import { z } from "zod";

const text = (what: string, max: number) => z.string({ message: `Enter ${what}.` }).trim().min(1, `Enter ${what}.`).max(max, `${capitalise(what)} can be at most ${max} characters.`);
function capitalise(s: string) {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
const optionalText = (max: number, what: string) =>
  z
    .string()
    .trim()
    .max(max, `${what} can be at most ${max} characters.`)
    .optional()
    .transform((v) => (v ? v : null));

export const newTrialSchema = z
  .object({
    code: z
      .string({ message: "Enter a trial code." })
      .trim()
      .min(2, "The trial code needs at least 2 characters.")
      .max(40, "The trial code can be at most 40 characters.")
      .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, "Use letters, digits, dots, dashes or underscores, starting with a letter or digit."),
    title: text("a title", 300),
    sponsorName: text("the sponsor's name", 200),
    phase: z.enum(["I", "I/II", "II", "II/III", "III"], { message: "Choose a phase." }).default("II"),
    designType: z.enum(["single", "two"], { message: "Choose single arm or two arms." }),
    endpointName: text("the endpoint's name", 200),
    toxicityEndpointName: optionalText(200, "The toxicity endpoint's name"),
    targetEnrolment: z.coerce
      .number({ message: "Enter the target enrolment." })
      .int("The target enrolment must be a whole number.")
      .min(2, "The target enrolment must be at least 2.")
      .max(10_000, "The target enrolment can be at most 10000."),
    armLabel: optionalText(100, "The arm label"),
    experimentalArmLabel: optionalText(100, "The experimental arm label"),
    controlArmLabel: optionalText(100, "The control arm label"),
  })
  .superRefine((v, ctx) => {
    if (v.designType === "single" && !v.armLabel) ctx.addIssue({ code: "custom", path: ["armLabel"], message: "Enter the arm's label." });
    if (v.designType === "two") {
      if (!v.experimentalArmLabel) ctx.addIssue({ code: "custom", path: ["experimentalArmLabel"], message: "Enter the experimental arm's label." });
      if (!v.controlArmLabel) ctx.addIssue({ code: "custom", path: ["controlArmLabel"], message: "Enter the control arm's label." });
      if (v.experimentalArmLabel && v.experimentalArmLabel === v.controlArmLabel)
        ctx.addIssue({ code: "custom", path: ["controlArmLabel"], message: "The two arms need different labels." });
    }
  });

export type NewTrialInput = z.infer<typeof newTrialSchema>;

/** The arms to insert for a validated new trial, in display order. */
export function armsFor(v: NewTrialInput): { label: string; armRole: "single" | "experimental" | "control" }[] {
  return v.designType === "single"
    ? [{ label: v.armLabel as string, armRole: "single" }]
    : [
        { label: v.experimentalArmLabel as string, armRole: "experimental" },
        { label: v.controlArmLabel as string, armRole: "control" },
      ];
}

export type NewTrialFormState = { error?: string; fieldErrors?: Record<string, string[] | undefined>; values?: Record<string, string> };
