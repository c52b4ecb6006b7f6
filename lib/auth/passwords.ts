import "server-only";
/**
 * Passwords: hashing, checking, and the rule a new password must meet. An account created by an
 * administrator has no usable password until its owner sets one through a one-time link, so the
 * administrator never chooses or learns it.
 */
import bcrypt from "bcryptjs";

/** bcrypt cost for stored passwords (at least 10, per the foundation issue). */
export const BCRYPT_ROUNDS = 11;

/** Stored instead of a hash until the owner sets a password: no password matches it. */
export const NO_PASSWORD = "!unset";

// A hash of a random string, compared when there is no usable hash, so timing does not reveal
// which e-mails are registered or which accounts have no password yet.
const DUMMY_HASH = "$2b$11$C6UzMDM.H6dfI/f/IKxGhuJ5e5y9lZ7zWBh3fE6Yxc.0kAnWpgbbu";

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_ROUNDS);
}

/** True when the password matches the stored hash; false for a missing or unset hash (after the same work). */
export async function verifyPassword(password: string, storedHash: string | null | undefined): Promise<boolean> {
  const usable = typeof storedHash === "string" && storedHash.startsWith("$2");
  const ok = await bcrypt.compare(password, usable ? storedHash : DUMMY_HASH);
  return usable && ok;
}

export { newPasswordSchema } from "./password-rules";
