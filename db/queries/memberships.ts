import "server-only";
import { db, type Tx } from "../knex";
import type { TrialRole } from "../types";

export async function fetchAnyRoleHeld(userId: number, role: TrialRole, tx: Tx = db): Promise<boolean> {
  const row = await tx("trial_memberships").where({ user_id: userId, role }).first("id");
  return Boolean(row);
}

/** The roles this person holds on this trial (for the separation-of-duties rule). */
export async function fetchRolesOnTrial(userId: number, trialId: number, tx: Tx = db): Promise<TrialRole[]> {
  const rows = await tx("trial_memberships").where({ user_id: userId, trial_id: trialId }).select("role");
  return rows.map((r: { role: TrialRole }) => r.role);
}

type MembershipListing = { id: number; trialId: number; trialCode: string; userId: number; userName: string; userEmail: string; role: TrialRole };

export async function fetchMemberships(filter: { trialId?: number } = {}, tx: Tx = db): Promise<MembershipListing[]> {
  const q = tx("trial_memberships as m")
    .join("users as u", "u.id", "m.user_id")
    .join("trials as t", "t.id", "m.trial_id")
    .select(
      "m.id",
      "m.trial_id as trialId",
      "t.code as trialCode",
      "m.user_id as userId",
      "u.name as userName",
      "u.email as userEmail",
      "m.role",
    )
    .orderBy(["t.code", "u.name", "m.role"]);
  if (filter.trialId !== undefined) q.where("m.trial_id", filter.trialId);
  return q;
}

/** The trials on which this person holds `role`, by trial id (the order locks are taken in). */
export async function fetchTrialsWithRole(userId: number, role: TrialRole, tx: Tx = db): Promise<{ trialId: number; trialCode: string }[]> {
  return tx("trial_memberships as m").join("trials as t", "t.id", "m.trial_id").where({ "m.user_id": userId, "m.role": role }).orderBy("m.trial_id").select("m.trial_id as trialId", "t.code as trialCode");
}

export async function fetchMembershipById(id: number, tx: Tx = db) {
  return tx("trial_memberships").where({ id }).first();
}

export async function insertMembership(tx: Tx, m: { trialId: number; userId: number; role: TrialRole }): Promise<number> {
  const [id] = await tx("trial_memberships").insert({ trial_id: m.trialId, user_id: m.userId, role: m.role });
  return id;
}

export async function deleteMembership(tx: Tx, id: number): Promise<number> {
  return tx("trial_memberships").where({ id }).delete();
}

/**
 * The memberships holding `role` on a trial whose accounts are active, locked until the transaction
 * ends: two administrators removing the last two holders at once cannot both see "one more left".
 */
export async function fetchActiveRoleHoldersForUpdate(tx: Tx, trialId: number, role: TrialRole): Promise<{ id: number; userId: number }[]> {
  return tx("trial_memberships as m")
    .join("users as u", "u.id", "m.user_id")
    .where({ "m.trial_id": trialId, "m.role": role, "u.is_active": true })
    .forUpdate()
    .select("m.id", "m.user_id as userId");
}
