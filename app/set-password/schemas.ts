import { z } from "zod";
import { newPasswordSchema } from "@/lib/auth/password-rules";

/** The token is 32 random bytes in base64url (43 characters); anything else cannot be a link of ours. */
export const setPasswordSchema = z
  .object({
    token: z.string({ message: "This page was opened without its link. Open the link from your e-mail again." }).regex(/^[A-Za-z0-9_-]{43}$/, "This page was opened without a valid link. Open the link from your e-mail again."),
    newPassword: newPasswordSchema,
    confirmPassword: z.string({ message: "Type the password again." }),
  })
  .refine((v) => v.newPassword === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords differ." });
