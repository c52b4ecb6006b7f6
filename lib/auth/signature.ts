import { signingPasswordSchema } from "@/lib/schema-pieces";
import "server-only";
/**
 * Electronic signatures (21 CFR Part 11 style): signing asks for the password again, and the
 * signature records the signer's name, the meaning, the time and a hash of the record signed.
 * Callers: confirmSigner() first, then insertSignature() (db/queries/signatures.ts) inside the same
 * transaction as the change the signature approves, then appendAudit().
 *
 * The password asked here is throttled with the sign-in rule (the same failures, per account and
 * address), so a stolen session cannot be used to guess the password offline-fast, and every wrong
 * password is audited as an open row.
 */
import { fetchUserById } from "@/db/queries/users";
import { recordAuditEvent } from "@/db/audit";
import type { PublicUser } from "@/db/types";
import { HttpError } from "@/lib/http";
import { verifyPassword } from "./passwords";
import { requestAddress } from "./client-address";
import { tooManyAttemptsMessage } from "./rate-limit";
import { clearPairFailures, recordSignInFailure, signInWaitMs } from "./sign-in-throttle";

export { signingPasswordSchema };

/**
 * Re-checks the signer's password; throws a 422 with a clear message when it is wrong, and a 429
 * when too many wrong passwords came from this account and address.
 */
export async function confirmSigner(user: PublicUser, password: string, address?: string): Promise<void> {
  const from = address ?? (await requestAddress());
  const account = user.email.toLowerCase();
  const wait = await signInWaitMs(account, from);
  if (wait > 0) throw new HttpError(429, `${tooManyAttemptsMessage(wait, "password")} Nothing was signed.`, { field: "password" });
  const row = await fetchUserById(user.id);
  const ok = row && row.is_active ? await verifyPassword(password, row.password_hash) : false;
  if (!ok) {
    await recordSignInFailure(account, from);
    await recordAuditEvent({
      actorUserId: user.id,
      actorEmail: user.email,
      trialId: null,
      action: "signature_password_failed",
      entityType: "user",
      entityId: user.id,
      visibility: "open",
    });
    throw new HttpError(422, "The password is not correct, so nothing was signed.", { field: "password" });
  }
  await clearPairFailures(account, from);
}
