/** The rule a new password must meet; pure, so forms and their tests can import it. */
import { z } from "zod";

/**
 * 12 to 200 characters. bcrypt reads only the first 72 bytes, so a longer password is not
 * stronger past that point (still accepted, as people paste long ones from a manager).
 */
export const newPasswordSchema = z
  .string({ message: "Enter a new password." })
  .min(12, "The password must be at least 12 characters.")
  .max(200, "The password can be at most 200 characters.");
