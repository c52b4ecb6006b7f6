"use server";
import { after } from "next/server";
import { requireUser } from "@/lib/auth";
import { changeOwnPassword } from "@/lib/auth/accounts";
import { requestAddress } from "@/lib/auth/client-address";
import { deliverWithRetries, ensureMailWorker } from "@/lib/mail/delivery";
import { changePasswordSchema, type ApiTokenFormState, type PasswordFormState, type RevokeFormState } from "./schemas";
import { revalidatePath } from "next/cache";
import { z } from "zod";
import { createApiToken, revokeApiToken } from "@/lib/auth/api-tokens";
import { formAction, formError } from "@/lib/form-action";

/** The owner's own password change; a refusal is shown beside the field it concerns. */
export const changePassword = formAction(async (_prev: PasswordFormState, form: FormData): Promise<PasswordFormState> => {
  const user = await requireUser();
  const { currentPassword, newPassword } = changePasswordSchema.parse(Object.fromEntries(form));
  const { emailId } = await changeOwnPassword(user, currentPassword, newPassword, await requestAddress());
  ensureMailWorker();
  try {
    after(() => deliverWithRetries([emailId]).then(() => undefined, (e) => console.error("[cairn] password notice delivery stopped; the sweep retries", e)));
  } catch {
    // Outside a request (tests): the mail worker's sweep sends it.
  }
  return { ok: "Your password was changed and every session of your account was signed out, this one included. Sign in again with the new password." };
}, { fieldsBeside: true });

/** Makes a personal API token for one of the account's roles; the secret is answered once, never stored. */
export async function createApiTokenAction(_prev: ApiTokenFormState, form: FormData): Promise<ApiTokenFormState> {
  try {
    const user = await requireUser();
    const [trialId, role] = String(form.get("scope") ?? "").split(":");
    const made = await createApiToken(user, { trialId: trialId || undefined, role: role || undefined, label: form.get("label") ?? undefined, days: form.get("days") || undefined });
    revalidatePath("/account");
    return { ok: "Token made. Copy it now: it is shown this once and Cairn keeps only a hash of it.", token: made.token, expiresAt: made.expiresAt.toISOString(), trialCode: made.trialCode };
  } catch (e) {
    const state = formError(e);
    // The two halves of "scope" are one field on the form.
    if (state.fieldErrors) {
      const { trialId, role, ...rest } = state.fieldErrors;
      const scope = [...(trialId ?? []), ...(role ?? [])];
      state.fieldErrors = scope.length ? { ...rest, scope } : rest;
    }
    return state;
  }
}

/** Revokes one of the account's tokens; it stops working at its next request. */
export async function revokeApiTokenAction(_prev: RevokeFormState, form: FormData): Promise<RevokeFormState> {
  try {
    const user = await requireUser();
    const parsed = revokeSchema.safeParse(Object.fromEntries(form));
    if (!parsed.success) return { error: "Choose a token to revoke.", fieldErrors: parsed.error.flatten().fieldErrors };
    await revokeApiToken(user, parsed.data.tokenId);
    revalidatePath("/account");
    return { ok: "Token revoked." };
  } catch (e) {
    return formError(e);
  }
}

const revokeSchema = z.object({ tokenId: z.coerce.number({ message: "Choose a token to revoke." }).int().positive("Choose a token to revoke.") });
