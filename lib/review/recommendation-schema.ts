/** The one schema for recording a recommendation, shared by the server action and the route handler. */
import { signingPasswordSchema } from "@/lib/schema-pieces";
import { z } from "zod";

import { RECOMMENDATION_DECISIONS } from "@/lib/domain";

export const RECOMMENDATION_DECISION_VALUES = RECOMMENDATION_DECISIONS;

export const recommendationSchema = z.object({
  decision: z.enum(RECOMMENDATION_DECISION_VALUES, { message: "Choose the committee's recommendation." }),
  rationale: z
    .string({ message: "Give the committee's rationale." })
    .trim()
    .min(10, "Give the committee's rationale (at least 10 characters).")
    .max(4000, "Keep the rationale under 4000 characters."),
  /** The entry this one corrects; empty for a first recommendation. */
  correctsId: z
    .union([z.literal("").transform(() => null), z.null(), z.coerce.number().int("Not a valid entry.").positive("Not a valid entry.").max(2_147_483_647)])
    .optional()
    .transform((v) => v ?? null),
  /** The meeting at which the committee decided; required when the trial has a committee. */
  meetingId: z
    .union([z.literal("").transform(() => null), z.null(), z.coerce.number().int("Not a valid meeting.").positive("Not a valid meeting.").max(2_147_483_647)])
    .optional()
    .transform((v) => v ?? null),
  /** Closed: the minority view, when the committee's vote was not unanimous. */
  dissent: z.string().trim().max(4000, "Keep the dissent under 4000 characters.").optional().transform((v) => (v ? v : null)),
  password: signingPasswordSchema,
});


export type RecommendationFormState = {
  ok?: string;
  error?: string;
  fieldErrors?: Partial<Record<"decision" | "rationale" | "correctsId" | "meetingId" | "dissent" | "password", string[]>>;
};
