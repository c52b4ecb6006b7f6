import { z } from "zod";
import { newPasswordSchema } from "@/lib/auth/password-rules";

export const changePasswordSchema = z
  .object({
    currentPassword: z.string({ message: "Enter your current password." }).min(1, "Enter your current password.").max(200, "That password is too long."),
    newPassword: newPasswordSchema,
    confirmPassword: z.string({ message: "Type the new password again." }),
  })
  .refine((v) => v.newPassword === v.confirmPassword, { path: ["confirmPassword"], message: "The two new passwords differ." })
  .refine((v) => v.newPassword !== v.currentPassword, { path: ["newPassword"], message: "Choose a password different from the current one." });

export type PasswordFormState = { ok?: string; error?: string; fieldErrors?: Record<string, string[] | undefined> };

/** The token form: one of the account's (trial, role) pairs as "trialId:role", a name, a lifetime. */
export type ApiTokenFormState = { ok?: string; error?: string; fieldErrors?: Record<string, string[] | undefined>; token?: string; expiresAt?: string; trialCode?: string };
export type RevokeFormState = { ok?: string; error?: string; fieldErrors?: Record<string, string[] | undefined> };
