// Zod pieces shared by forms and JSON bodies, written once so every boundary says the same thing
// in the same words. Pure (no server-only imports): client forms may use them too.
import { z } from "zod";

/** The password re-entered to sign (e-signature); checked against the account by lib/auth/signature. */
export const signingPasswordSchema = z
  .string({ message: "Enter your password to sign." })
  .min(1, "Enter your password to sign.")
  .max(200, "That password is too long.");

const STALE = "The version of the record you edited is missing; reload the page.";
/**
 * The optimistic-lock version a form or a JSON body sends back. Digits in a string (a form field)
 * or a number (JSON); nothing else is coerced, so `true` or "1e3" is refused, not read as a number.
 */
export const rowVersionSchema = z.preprocess(
  (v) => (typeof v === "string" && /^[0-9]{1,10}$/.test(v.trim()) ? Number(v.trim()) : v),
  z.number({ message: STALE }).int(STALE).min(1, STALE).max(2_147_483_647, STALE),
);

/** A reason the audit trail keeps (a correction, an amendment): trimmed, at least `min` characters. */
export function reasonSchema(what: string, min = 10, max = 1000) {
  return z
    .string({ message: `Give the reason for ${what}.` })
    .trim()
    .min(min, `Give the reason for ${what} (at least ${min} characters).`)
    .max(max, `The reason can be at most ${max} characters.`);
}
