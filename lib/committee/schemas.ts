/** The zod schemas of the committee's acts, shared by the server actions and the services. */
import { z } from "zod";

/** The decisions a member votes for: the same as a recommendation's (lib/review/recommendation-schema.ts), restated so the open side imports nothing from the review. */
const RECOMMENDATION_DECISION_VALUES = ["continue", "continue_modified", "stop_futility", "stop_efficacy", "stop_safety"] as const;

const id = (what: string) => z.coerce.number({ message: `Not a valid ${what}.` }).int(`Not a valid ${what}.`).positive(`Not a valid ${what}.`).max(2_147_483_647, `Not a valid ${what}.`);
const password = z.string({ message: "Enter your password to sign." }).min(1, "Enter your password to sign.").max(200, "That password is too long.");

const COMMITTEE_ROLE_VALUES = ["chair", "voting", "statistician"] as const;
export const COMMITTEE_ROLE_LABELS: Record<(typeof COMMITTEE_ROLE_VALUES)[number], string> = {
  chair: "Chair (votes)",
  voting: "Voting member",
  statistician: "Independent statistician (does not vote)",
};

export const addMemberSchema = z.object({
  userId: id("person"),
  role: z.enum(COMMITTEE_ROLE_VALUES, { message: "Choose the member's place on the committee." }),
});

export const changeChairSchema = z.object({
  memberId: id("member"),
  /** The member's row version the administrator saw; empty when the form did not carry one. */
  rowVersion: z
    .union([z.literal("").transform(() => null), z.null(), z.coerce.number().int().min(1)])
    .optional()
    .transform((v) => v ?? null),
});

export const quorumSchema = z.object({
  quorum: z.coerce.number({ message: "Give the quorum as a whole number." }).int("Give the quorum as a whole number.").min(1, "The quorum is at least 1 voting member.").max(30, "The quorum is at most 30 voting members."),
});

const SESSION_VALUES = ["open", "closed"] as const;

export const sessionAttendanceSchema = z.object({
  meetingId: id("meeting"),
  session: z.enum(SESSION_VALUES, { message: "Choose the session." }),
  attendedIds: z.array(id("person")).max(200),
});

export const declarationSchema = z
  .object({
    meetingId: id("meeting"),
    hasConflict: z.enum(["no", "yes"], { message: "Say whether you have a new conflict of interest." }),
    statement: z.string().trim().max(2000, "Keep the statement under 2000 characters.").optional().default(""),
    password,
  })
  .superRefine((v, ctx) => {
    if (v.hasConflict === "yes" && v.statement.length < 5) ctx.addIssue({ code: "custom", path: ["statement"], message: "State the conflict (at least 5 characters)." });
  });

export const voteSchema = z.object({
  meetingId: id("meeting"),
  decision: z.enum(RECOMMENDATION_DECISION_VALUES, { message: "Choose your vote." }),
  comment: z.string().trim().max(4000, "Keep the comment under 4000 characters.").optional().default(""),
  password,
});

export const minutesDraftSchema = z.object({
  meetingId: id("meeting"),
  session: z.enum(SESSION_VALUES, { message: "Choose the session." }),
  body: z.string({ message: "Write the minutes." }).trim().min(10, "Write the minutes (at least 10 characters).").max(50_000, "Keep the minutes under 50,000 characters."),
  /** The row version of the draft being edited; empty to start a new version. */
  rowVersion: z
    .union([z.literal("").transform(() => null), z.null(), z.coerce.number().int().min(1)])
    .optional()
    .transform((v) => v ?? null),
});

export const minutesApproveSchema = z.object({
  meetingId: id("meeting"),
  session: z.enum(SESSION_VALUES, { message: "Choose the session." }),
  password,
});

export const letterSchema = z.object({ meetingId: id("meeting"), password });
export const letterSendSchema = z.object({ meetingId: id("meeting") });

export type CommitteeFormState = { ok?: string; error?: string; fieldErrors?: Record<string, string[] | undefined> };
