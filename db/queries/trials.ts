import "server-only";
import { db, type Tx } from "../knex";
import type { ArmRow, PublicUser, TrialRole, TrialRow } from "../types";

/** Open columns of a trial: nothing here is outcome data. */
const TRIAL_COLUMNS = [
  "t.id",
  "t.code",
  "t.title",
  "t.sponsor_name",
  "t.phase",
  "t.design_type",
  "t.endpoint_name",
  "t.toxicity_endpoint_name",
  "t.target_enrolment",
  "t.first_patient_on",
  "t.status",
  "t.created_by",
  "t.created_at",
  "t.updated_at",
];

type TrialListing = TrialRow & { roles: TrialRole[] };

/** The trials a user belongs to, with the roles held on each; administrators see every trial. */
export async function fetchTrialsForUser(userId: number, isAdmin: boolean, tx: Tx = db): Promise<TrialListing[]> {
  const trials: TrialRow[] = isAdmin
    ? await tx("trials as t").select(TRIAL_COLUMNS).orderBy("t.code")
    : await tx("trials as t")
        .whereIn("t.id", tx("trial_memberships").where({ user_id: userId }).select("trial_id"))
        .select(TRIAL_COLUMNS)
        .orderBy("t.code");
  const memberships = await tx("trial_memberships").where({ user_id: userId }).select("trial_id", "role");
  return trials.map((t) => ({
    ...t,
    roles: memberships.filter((m: { trial_id: number }) => m.trial_id === t.id).map((m: { role: TrialRole }) => m.role),
  }));
}

export async function fetchTrial(trialId: number, tx: Tx = db): Promise<TrialRow | undefined> {
  return tx("trials as t").where("t.id", trialId).first(TRIAL_COLUMNS);
}

export type AccessFacts = { user: PublicUser | undefined; sessionVersion: number; trial: TrialRow | undefined; roles: TrialRole[] };

/**
 * Everything an authorization decision reads, in one round trip (it runs on every request):
 * the account and its flags, the trial, and the roles the account holds on it.
 */
export async function fetchAccessFacts(userId: number, trialId: number, tx: Tx = db): Promise<AccessFacts> {
  const rows = await tx("users as u")
    .leftJoin("trials as t", (j) => j.onVal("t.id", "=", trialId))
    .leftJoin("trial_memberships as m", (j) => j.on("m.user_id", "=", "u.id").andOn("m.trial_id", "=", "t.id"))
    .where("u.id", userId)
    .select(["u.id as user_id", "u.email as user_email", "u.name as user_name", "u.is_admin as user_is_admin", "u.is_active as user_is_active", "u.session_version as user_session_version", ...TRIAL_COLUMNS, "m.role as membership_role"]);
  if (!rows.length) return { user: undefined, sessionVersion: 0, trial: undefined, roles: [] };
  const { user_id, user_email, user_name, user_is_admin, user_is_active, user_session_version, membership_role: _role, ...trial } = rows[0];
  return {
    user: { id: user_id, email: user_email, name: user_name, isAdmin: Boolean(user_is_admin), isActive: Boolean(user_is_active) },
    sessionVersion: Number(user_session_version),
    trial: trial.id === null ? undefined : (trial as TrialRow),
    roles: rows.map((r: { membership_role: TrialRole | null }) => r.membership_role).filter((r): r is TrialRole => r !== null),
  };
}

export async function fetchTrialByCode(code: string, tx: Tx = db): Promise<TrialRow | undefined> {
  return tx("trials as t").where("t.code", code).first(TRIAL_COLUMNS);
}

export async function fetchArms(trialId: number, tx: Tx = db): Promise<ArmRow[]> {
  return tx<ArmRow>("arms").where({ trial_id: trialId }).orderBy("sort_order");
}

type NewTrial = {
  code: string;
  title: string;
  sponsorName: string;
  phase: string;
  designType: "single" | "two";
  endpointName: string;
  toxicityEndpointName: string | null;
  targetEnrolment: number;
  createdBy: number | null;
  arms: Array<{ label: string; armRole: ArmRow["arm_role"] }>;
};

/** Inserts a trial and its arms; the caller owns the transaction (and writes the audit row). */
export async function insertTrial(tx: Tx, t: NewTrial): Promise<number> {
  const [id] = await tx("trials").insert({
    code: t.code,
    title: t.title,
    sponsor_name: t.sponsorName,
    phase: t.phase,
    design_type: t.designType,
    endpoint_name: t.endpointName,
    toxicity_endpoint_name: t.toxicityEndpointName,
    target_enrolment: t.targetEnrolment,
    created_by: t.createdBy,
  });
  await tx("arms").insert(t.arms.map((a, i) => ({ trial_id: id, label: a.label, arm_role: a.armRole, sort_order: i })));
  return id;
}

/** Locks a trial row for the rest of the transaction: serialises writes that depend on the trial's current state. */
export async function lockTrialRow(tx: Tx, trialId: number): Promise<void> {
  await tx("trials").where({ id: trialId }).forUpdate().first("id");
}

/** Whether a trial code is taken (codes are unique; checked before insert for a field-level message). */
export async function trialCodeTaken(code: string, tx: Tx = db): Promise<boolean> {
  return Boolean(await tx("trials").where({ code }).first("id"));
}
