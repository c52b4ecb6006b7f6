"use server";
import { revalidatePath } from "next/cache";
import { requireAdmin } from "@/lib/auth";
import { createAccountWithLink, grantTrialRole, reissuePasswordLink, revokeTrialRole, setAccountActive } from "@/lib/auth/accounts";
import { deliverAfterResponse } from "@/lib/mail/delivery";
import { accountActionSchema, assignRoleSchema, createAccountSchema, removeRoleSchema, type FormState } from "./schemas";
import type { PublicUser, TrialRole } from "@/db/types";
import { formError } from "@/lib/form-action";

/**
 * Any failure becomes form state through the one mapping (lib/form-action.ts): a refusal naming a
 * field is shown beside that field, anything else (the database down, a fault) as the form's
 * message, never the error page.
 */
function refused(e: unknown, values?: Record<string, string>): FormState {
  return { ...formError(e, { fieldsBeside: true }), values };
}

async function admin(): Promise<PublicUser | FormState> {
  try {
    return await requireAdmin();
  } catch (e) {
    return refused(e);
  }
}
const isState = (a: PublicUser | FormState): a is FormState => !("id" in a);

const linkShown = (l: { url: string; expiresAt: Date }, forName: string) => ({ url: l.url, expiresAt: `${l.expiresAt.toISOString().slice(0, 16).replace("T", " ")} UTC`, forName });

export async function createAccount(_prev: FormState, form: FormData): Promise<FormState> {
  const a = await admin();
  if (isState(a)) return a;
  const values = { name: String(form.get("name") ?? "").slice(0, 300), email: String(form.get("email") ?? "").slice(0, 300) };
  const parsed = createAccountSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) return { error: "Check the highlighted fields.", fieldErrors: parsed.error.flatten().fieldErrors, values };
  try {
    const created = await createAccountWithLink(a, parsed.data);
    deliverAfterResponse([created.emailId]);
    revalidatePath("/admin");
    return { ok: `Account created for ${parsed.data.name}. A set-password link was e-mailed to ${parsed.data.email.toLowerCase()}.`, link: linkShown(created, parsed.data.name) };
  } catch (e) {
    if ((e as { code?: string }).code === "ER_DUP_ENTRY") return { error: "Check the highlighted fields.", fieldErrors: { email: ["An account with this e-mail address already exists."] }, values };
    return refused(e, values);
  }
}

export async function sendPasswordLink(_prev: FormState, form: FormData): Promise<FormState> {
  const a = await admin();
  if (isState(a)) return a;
  const parsed = accountActionSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) return { error: "That account is not valid." };
  try {
    const link = await reissuePasswordLink(a, parsed.data.userId);
    deliverAfterResponse([link.emailId]);
    revalidatePath("/admin");
    return { ok: "A new set-password link was e-mailed; earlier links no longer work.", link: linkShown(link, "this account") };
  } catch (e) {
    return refused(e);
  }
}

async function changeActive(form: FormData, active: boolean): Promise<FormState> {
  const a = await admin();
  if (isState(a)) return a;
  const parsed = accountActionSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) return { error: "That account is not valid." };
  try {
    const u = await setAccountActive(a, parsed.data.userId, active);
    revalidatePath("/admin");
    return { ok: active ? `${u.name} is active again.` : `${u.name} is deactivated and signed out everywhere.` };
  } catch (e) {
    return refused(e);
  }
}

export async function deactivateAccount(_prev: FormState, form: FormData): Promise<FormState> {
  return changeActive(form, false);
}

export async function reactivateAccount(_prev: FormState, form: FormData): Promise<FormState> {
  return changeActive(form, true);
}

export async function assignRole(_prev: FormState, form: FormData): Promise<FormState> {
  const a = await admin();
  if (isState(a)) return a;
  const parsed = assignRoleSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) return { error: "Check the highlighted fields.", fieldErrors: parsed.error.flatten().fieldErrors };
  const { userId, trialId, role } = parsed.data;
  try {
    const r = await grantTrialRole(a, { userId, trialId, role: role as TrialRole });
    revalidatePath("/admin");
    return { ok: `${r.userName} is now ${role.replace(/_/g, " ")} on ${r.trialCode}.` };
  } catch (e) {
    if ((e as { code?: string }).code === "ER_DUP_ENTRY") return { error: "That person already holds that role on that trial." };
    return refused(e);
  }
}

export async function removeRole(_prev: FormState, form: FormData): Promise<FormState> {
  const a = await admin();
  if (isState(a)) return a;
  const parsed = removeRoleSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) return { error: "That role assignment is not valid." };
  try {
    await revokeTrialRole(a, parsed.data.membershipId);
  } catch (e) {
    return refused(e);
  }
  revalidatePath("/admin");
  return { ok: "Role removed." };
}
