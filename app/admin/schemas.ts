import { z } from "zod";
import { TRIAL_ROLES } from "@/db/types";

/** No password field: the owner sets it through a one-time link (lib/auth/accounts.ts). */
export const createAccountSchema = z.object({
  name: z.string().trim().min(1, "Enter the person's name.").max(120, "The name can be at most 120 characters."),
  email: z.string().trim().min(1, "Enter an e-mail address.").max(254, "The e-mail address is too long.").email("Enter a valid e-mail address."),
  isAdmin: z.preprocess((v) => v === "on" || v === "true" || v === true, z.boolean()),
});

export const assignRoleSchema = z.object({
  userId: z.coerce.number().int("Choose a person.").positive("Choose a person."),
  trialId: z.coerce.number().int("Choose a trial.").positive("Choose a trial."),
  role: z.enum(TRIAL_ROLES, { message: "Choose a role." }),
});

export const removeRoleSchema = z.object({ membershipId: z.coerce.number().int().positive() });

/** Deactivate, reactivate, or send a new set-password link: one account chosen by id. */
export const accountActionSchema = z.object({
  userId: z.coerce.number({ message: "Choose an account." }).int("Choose an account.").positive("Choose an account."),
});

/** What a form action returns: a message, field errors, and the submitted values to show again (never passwords). */
export type FormState = {
  ok?: string;
  error?: string;
  fieldErrors?: Record<string, string[] | undefined>;
  values?: Record<string, string>;
  /** A set-password link, shown once to the administrator who issued it. */
  link?: { url: string; expiresAt: string; forName: string };
};
