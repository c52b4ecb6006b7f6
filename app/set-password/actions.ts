"use server";
import { formError } from "@/lib/form-action";
import { after } from "next/server";
import { setPasswordWithLink } from "@/lib/auth/accounts";
import { deliverWithRetries, ensureMailWorker } from "@/lib/mail/delivery";
import { setPasswordSchema } from "./schemas";

export type SetPasswordState = { ok?: string; error?: string; fieldErrors?: Record<string, string[] | undefined> };

/** Public: the link's token is the only credential (256 random bits, single use, expiring). */
export async function setPassword(_prev: SetPasswordState, form: FormData): Promise<SetPasswordState> {
  const parsed = setPasswordSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) {
    const fieldErrors = parsed.error.flatten().fieldErrors;
    return { error: fieldErrors.token?.[0] ?? "Check the highlighted fields.", fieldErrors };
  }
  try {
    const { emailId } = await setPasswordWithLink(parsed.data.token, parsed.data.newPassword);
    ensureMailWorker();
    try {
      after(() => deliverWithRetries([emailId]).then(() => undefined, (e) => console.error("[cairn] password notice delivery stopped; the sweep retries", e)));
    } catch {
      // Outside a request (tests): the mail worker's sweep sends it.
    }
  } catch (e) {
    return formError(e);
  }
  return { ok: "Your password is set. Sign in with your e-mail address and the new password." };
}
