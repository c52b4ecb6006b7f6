"use server";
import { formError } from "@/lib/form-action";
import { after } from "next/server";
import { requireUser } from "@/lib/auth";
import { changeOwnPassword } from "@/lib/auth/accounts";
import { requestAddress } from "@/lib/auth/client-address";
import { deliverWithRetries, ensureMailWorker } from "@/lib/mail/delivery";
import { HttpError } from "@/lib/http";
import { changePasswordSchema, type PasswordFormState } from "./schemas";

export async function changePassword(_prev: PasswordFormState, form: FormData): Promise<PasswordFormState> {
  let user;
  try {
    user = await requireUser();
  } catch (e) {
    return formError(e);
  }
  const parsed = changePasswordSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) return { error: "Check the highlighted fields.", fieldErrors: parsed.error.flatten().fieldErrors };
  try {
    const { emailId } = await changeOwnPassword(user, parsed.data.currentPassword, parsed.data.newPassword, await requestAddress());
    ensureMailWorker();
    try {
      after(() => deliverWithRetries([emailId]).then(() => undefined, (e) => console.error("[cairn] password notice delivery stopped; the sweep retries", e)));
    } catch {
      // Outside a request (tests): the mail worker's sweep sends it.
    }
  } catch (e) {
    if (!(e instanceof HttpError)) return formError(e);
    const field = (e.details as { field?: string } | undefined)?.field;
    return field ? { error: e.message, fieldErrors: { [field]: [e.message] } } : { error: e.message };
  }
  return { ok: "Your password was changed and every session of your account was signed out, this one included. Sign in again with the new password." };
}
