import "server-only";
/**
 * Electronic signatures (21 CFR Part 11 style): signing asks for the password again, and the
 * signature records the signer's name, the meaning, the time and a hash of the record signed.
 * Callers: confirmSigner() first, then insertSignature() (db/queries/signatures.ts) inside the same
 * transaction as the change the signature approves, then appendAudit().
 */
import bcrypt from "bcryptjs";
import { z } from "zod";
import { fetchUserById } from "@/db/queries/users";
import type { PublicUser } from "@/db/types";
import { HttpError } from "@/lib/http";

export const signingPasswordSchema = z
  .string({ message: "Enter your password to sign." })
  .min(1, "Enter your password to sign.")
  .max(200, "That password is too long.");

/** Re-checks the signer's password; throws a 422 with a clear message when it is wrong. */
export async function confirmSigner(user: PublicUser, password: string): Promise<void> {
  const row = await fetchUserById(user.id);
  const ok = row ? await bcrypt.compare(password, row.password_hash) : false;
  if (!ok) throw new HttpError(422, "The password is not correct, so nothing was signed.", { field: "password" });
}
