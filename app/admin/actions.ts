"use server";
import bcrypt from "bcryptjs";
import { revalidatePath } from "next/cache";
import { requireAdmin } from "@/lib/auth";
import { BCRYPT_ROUNDS } from "@/lib/auth/options";
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { fetchUserByEmail, fetchUserById, insertUser } from "@/db/queries/users";
import { deleteMembership, fetchMembershipById, insertMembership } from "@/db/queries/memberships";
import { fetchTrial } from "@/db/queries/trials";
import { assignRoleSchema, createAccountSchema, removeRoleSchema, type FormState } from "./schemas";
import type { TrialRole } from "@/db/types";
import { HttpError } from "@/lib/http";

function denied(e: unknown): FormState {
  if (e instanceof HttpError) return { error: e.message };
  throw e;
}

export async function createAccount(_prev: FormState, form: FormData): Promise<FormState> {
  let admin;
  try {
    admin = await requireAdmin();
  } catch (e) {
    return denied(e);
  }
  const parsed = createAccountSchema.safeParse(Object.fromEntries(form));
  const values = { name: String(form.get("name") ?? ""), email: String(form.get("email") ?? "") };
  if (!parsed.success) return { error: "Check the highlighted fields.", fieldErrors: parsed.error.flatten().fieldErrors, values };
  const { name, email, password, isAdmin } = parsed.data;
  if (await fetchUserByEmail(email)) return { error: "Check the highlighted fields.", fieldErrors: { email: ["An account with this e-mail address already exists."] }, values };
  const passwordHash = await bcrypt.hash(password, BCRYPT_ROUNDS);
  try {
    await writeTransaction(async (tx) => {
      const id = await insertUser(tx, { email, name, passwordHash, isAdmin });
      await appendAudit(tx, {
        actorUserId: admin.id,
        actorEmail: admin.email,
        trialId: null,
        action: "account_created",
        entityType: "user",
        entityId: id,
        visibility: "open",
        newValues: { name, email: email.toLowerCase(), isAdmin },
      });
    });
  } catch (e) {
    if ((e as { code?: string }).code === "ER_DUP_ENTRY")
      return { error: "Check the highlighted fields.", fieldErrors: { email: ["An account with this e-mail address already exists."] }, values };
    throw e;
  }
  revalidatePath("/admin");
  return { ok: `Account created for ${name}.` };
}

export async function assignRole(_prev: FormState, form: FormData): Promise<FormState> {
  let admin;
  try {
    admin = await requireAdmin();
  } catch (e) {
    return denied(e);
  }
  const parsed = assignRoleSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) return { error: "Check the highlighted fields.", fieldErrors: parsed.error.flatten().fieldErrors };
  const { userId, trialId, role } = parsed.data;
  const [user, trial] = await Promise.all([fetchUserById(userId), fetchTrial(trialId)]);
  if (!user) return { fieldErrors: { userId: ["That person no longer exists."] }, error: "Check the highlighted fields." };
  if (!trial) return { fieldErrors: { trialId: ["That trial no longer exists."] }, error: "Check the highlighted fields." };
  try {
    await writeTransaction(async (tx) => {
      const id = await insertMembership(tx, { trialId, userId, role: role as TrialRole });
      await appendAudit(tx, {
        actorUserId: admin.id,
        actorEmail: admin.email,
        trialId,
        action: "role_assigned",
        entityType: "trial_membership",
        entityId: id,
        visibility: "open",
        newValues: { user: user.email, trial: trial.code, role },
      });
    });
  } catch (e) {
    if ((e as { code?: string }).code === "ER_DUP_ENTRY") return { error: `${user.name} already holds that role on ${trial.code}.` };
    throw e;
  }
  revalidatePath("/admin");
  return { ok: `${user.name} is now ${role.replace(/_/g, " ")} on ${trial.code}.` };
}

export async function removeRole(_prev: FormState, form: FormData): Promise<FormState> {
  let admin;
  try {
    admin = await requireAdmin();
  } catch (e) {
    return denied(e);
  }
  const parsed = removeRoleSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) return { error: "That role assignment is not valid." };
  const m = await fetchMembershipById(parsed.data.membershipId);
  if (!m) return { error: "That role assignment no longer exists." };
  await writeTransaction(async (tx) => {
    await deleteMembership(tx, m.id);
    await appendAudit(tx, {
      actorUserId: admin.id,
      actorEmail: admin.email,
      trialId: m.trial_id,
      action: "role_removed",
      entityType: "trial_membership",
      entityId: m.id,
      visibility: "open",
      oldValues: { userId: m.user_id, trialId: m.trial_id, role: m.role },
    });
  });
  revalidatePath("/admin");
  return { ok: "Role removed." };
}
