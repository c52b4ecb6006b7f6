import "server-only";
/**
 * Writes of the design studio: create a trial, create / update / lock / amend a design version.
 * Callers pass the TrialAccess they got from lib/auth (route handlers: requireTrialAccess; tests:
 * checkTrialAccess), and the capability is checked again here so no caller can skip it. Every
 * write is one transaction that appends exactly one (open) audit row: a design is not outcome data.
 */
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import {
  fetchDesign,
  fetchDesignForUpdate,
  fetchDesignStatusesForUpdate,
  fetchLockedDesignIds,
  insertDesignVersion,
  markDesignLocked,
  supersedeLockedDesigns,
  updateDraftSpec,
  type DesignRecord,
} from "@/db/queries/designs";
import { insertTrial, lockTrialRow, trialCodeTaken } from "@/db/queries/trials";
import { insertMembership, fetchAnyRoleHeld } from "@/db/queries/memberships";
import { insertSignature, recordHash } from "@/db/queries/signatures";
import { createPlannedLooks } from "@/db/queries/analyses";
import type { PublicUser } from "@/db/types";
import { assertCapability, type TrialAccess } from "@/lib/auth";
import { confirmSigner, signingPasswordSchema } from "@/lib/auth/signature";
import { HttpError, conflict, notFoundError } from "@/lib/http";
import { expandLooks } from "@/lib/stats/looks";
import type { Design } from "@/lib/stats/types";
import { amendBodySchema, parseDesignForTrial } from "./api-schemas";
import { armsFor, type NewTrialInput } from "./trial-schema";
import { setDraftDesignQuorum } from "@/db/queries/committee";

const STATUS_WORDS = { draft: "a draft", locked: "the locked charter version", superseded: "a superseded version" } as const;

/** The exact content a design signature is bound to (the same shape the demo seed signs). */
export function designSignedRecord(trialId: number, version: number, spec: Design, dmcQuorum: number | null = null) {
  // The DMC's quorum is part of the charter version when one is written (records without one hash as before).
  return dmcQuorum === null ? { trialId, version, spec } : { trialId, version, spec, dmcQuorum };
}

// ---------------------------------------------------------------------------------------------
// Trials
// ---------------------------------------------------------------------------------------------

type CreateTrialResult = { ok: true; trialId: number } | { ok: false; fieldErrors: Record<string, string[]> };

/**
 * Creates a trial and its arms. The creator becomes its unblinded statistician unless they are an
 * administrator with no unblinded-statistician role anywhere (an administrator stays blinded).
 */
export async function createTrial(user: PublicUser, input: NewTrialInput): Promise<CreateTrialResult> {
  const isStatistician = await fetchAnyRoleHeld(user.id, "unblinded_statistician");
  if (!user.isAdmin && !isStatistician) throw new HttpError(403, "Only an administrator or an unblinded statistician may create a trial.");
  if (await trialCodeTaken(input.code)) return { ok: false, fieldErrors: { code: ["A trial with this code already exists."] } };
  try {
    const trialId = await writeTransaction(async (tx) => {
      const id = await insertTrial(tx, {
        code: input.code,
        title: input.title,
        sponsorName: input.sponsorName,
        phase: input.phase,
        designType: input.designType,
        endpointName: input.endpointName,
        toxicityEndpointName: input.toxicityEndpointName,
        targetEnrolment: input.targetEnrolment,
        createdBy: user.id,
        arms: armsFor(input),
      });
      const creatorRole = isStatistician ? "unblinded_statistician" : null;
      if (creatorRole) await insertMembership(tx, { trialId: id, userId: user.id, role: creatorRole });
      await appendAudit(tx, {
        actorUserId: user.id,
        actorEmail: user.email,
        trialId: id,
        action: "trial_created",
        entityType: "trial",
        entityId: id,
        visibility: "open",
        newValues: { ...input, arms: armsFor(input), creatorRole },
      });
      return id;
    });
    return { ok: true, trialId };
  } catch (e) {
    if ((e as { code?: string }).code === "ER_DUP_ENTRY") return { ok: false, fieldErrors: { code: ["A trial with this code already exists."] } };
    throw e;
  }
}

// ---------------------------------------------------------------------------------------------
// Designs
// ---------------------------------------------------------------------------------------------

async function designOfTrial(access: TrialAccess, designId: number): Promise<DesignRecord> {
  const d = Number.isInteger(designId) && designId > 0 ? await fetchDesign(designId) : undefined;
  if (!d || d.trial_id !== access.trial.id) throw notFoundError("That design version");
  return d;
}

/** The first draft of a trial's design. Refused when a draft exists (edit it) or a version is locked (amend it). */
export async function createDraftDesign(access: TrialAccess, specInput: unknown): Promise<DesignRecord> {
  assertCapability(access, "editDesign");
  const spec = parseDesignForTrial(specInput, access.trial.design_type);
  const { user, trial } = access;
  const id = await writeTransaction(async (tx) => {
    await lockTrialRow(tx, trial.id);
    const versions = await fetchDesignStatusesForUpdate(tx, trial.id);
    const draft = versions.find((v) => v.status === "draft");
    if (draft) throw conflict(`Version ${draft.version} is already a draft: edit and save that one.`);
    if (versions.some((v) => v.status === "locked")) throw conflict("The design is locked. To change it, start an amendment with a reason.");
    const created = await insertDesignVersion(tx, { trialId: trial.id, spec, createdBy: user.id, amendmentReason: null });
    await appendAudit(tx, {
      actorUserId: user.id,
      actorEmail: user.email,
      trialId: trial.id,
      action: "design_draft_created",
      entityType: "design",
      entityId: created.id,
      visibility: "open",
      newValues: { version: created.version, spec },
    });
    return created.id;
  });
  return (await fetchDesign(id)) as DesignRecord;
}

/**
 * Saves a draft if nobody saved it since the editor loaded revision `rowVersion` (optimistic
 * concurrency): a stale save is a 409 and writes nothing.
 */
export async function updateDraftDesign(access: TrialAccess, designId: number, rowVersion: number, specInput: unknown): Promise<DesignRecord> {
  assertCapability(access, "editDesign");
  await designOfTrial(access, designId);
  const spec = parseDesignForTrial(specInput, access.trial.design_type);
  const { user, trial } = access;
  await writeTransaction(async (tx) => {
    const current = await fetchDesignForUpdate(tx, designId);
    if (!current) throw notFoundError("That design version");
    if (current.status !== "draft")
      throw conflict(`Version ${current.version} is ${STATUS_WORDS[current.status]} and cannot be edited. To change the design, start an amendment with a reason.`);
    if (current.row_version !== rowVersion || !(await updateDraftSpec(tx, designId, rowVersion, spec)))
      throw new HttpError(
        409,
        `Someone else saved this draft after you opened it (you edited revision ${rowVersion}; it is now at revision ${current.row_version}). Your changes were not saved: reload the draft, then make them again.`,
        { currentRowVersion: current.row_version },
      );
    await appendAudit(tx, {
      actorUserId: user.id,
      actorEmail: user.email,
      trialId: trial.id,
      action: "design_draft_updated",
      entityType: "design",
      entityId: designId,
      visibility: "open",
      oldValues: { version: current.version, rowVersion, spec: current.spec },
      newValues: { version: current.version, rowVersion: rowVersion + 1, spec },
    });
  });
  return (await fetchDesign(designId)) as DesignRecord;
}

/**
 * Locks a draft as the charter version with an electronic signature ("design approved", bound to
 * the version by the hash of {trialId, version, spec}); supersedes the earlier charter version and
 * creates the planned analyses from the looks.
 */
export async function lockDesign(access: TrialAccess, designId: number, rowVersion: number, passwordInput: unknown): Promise<DesignRecord> {
  assertCapability(access, "lockDesign");
  await designOfTrial(access, designId);
  const password = signingPasswordSchema.parse(passwordInput);
  const { user, trial } = access;
  await confirmSigner(user, password);
  await writeTransaction(async (tx) => {
    await lockTrialRow(tx, trial.id);
    const current = await fetchDesignForUpdate(tx, designId);
    if (!current) throw notFoundError("That design version");
    if (current.status !== "draft") throw conflict(`Version ${current.version} is ${STATUS_WORDS[current.status]}; only a draft can be locked.`);
    if (current.row_version !== rowVersion)
      throw new HttpError(409, `This draft changed after you opened it (revision ${rowVersion}; now ${current.row_version}). Reload it and check it before signing.`, {
        currentRowVersion: current.row_version,
      });
    const superseded = await fetchLockedDesignIds(tx, trial.id);
    await supersedeLockedDesigns(tx, trial.id);
    const record = designSignedRecord(trial.id, current.version, current.spec, current.dmc_quorum ?? null);
    const sig = await insertSignature(tx, {
      userId: user.id,
      signerName: user.name,
      signerEmail: user.email,
      meaning: "design approved",
      entityType: "design",
      entityId: current.id,
      record,
    });
    await markDesignLocked(tx, current.id, sig.id);
    const looks = expandLooks(current.spec.looks, current.spec.arms === "single" ? current.spec.nMax : current.spec.nMaxPerArm);
    // Looks not yet locked (even with counts) move to this version; locked ones keep theirs.
    const movedLooks = await createPlannedLooks(tx, trial.id, current.id, looks);
    await appendAudit(tx, {
      actorUserId: user.id,
      actorEmail: user.email,
      trialId: trial.id,
      action: "design_locked",
      entityType: "design",
      entityId: current.id,
      visibility: "open",
      oldValues: { status: "draft", supersededVersions: superseded.map((s) => s.version) },
      newValues: {
        status: "locked",
        version: current.version,
        signatureId: sig.id,
        signer: user.name,
        meaning: sig.meaning,
        signedAt: sig.signed_at,
        recordHash: sig.record_hash,
        plannedLooks: looks,
        movedLooks,
      },
    });
  });
  return (await fetchDesign(designId)) as DesignRecord;
}

/** Starts an amendment: a new draft version copied from the locked charter version, with a required reason. */
export async function amendDesign(access: TrialAccess, designId: number, reasonInput: unknown): Promise<DesignRecord> {
  assertCapability(access, "editDesign");
  await designOfTrial(access, designId);
  const reason = amendBodySchema.shape.reason.parse(reasonInput);
  const { user, trial } = access;
  const id = await writeTransaction(async (tx) => {
    await lockTrialRow(tx, trial.id);
    const versions = await fetchDesignStatusesForUpdate(tx, trial.id);
    const draft = versions.find((v) => v.status === "draft");
    if (draft) throw conflict(`Version ${draft.version} is already a draft amendment: edit that one.`);
    const source = await fetchDesignForUpdate(tx, designId);
    if (!source || source.status !== "locked") throw conflict("Only the locked charter version can be amended.");
    const created = await insertDesignVersion(tx, { trialId: trial.id, spec: source.spec, createdBy: user.id, amendmentReason: reason });
    // The amendment starts from the charter's quorum too (changed, if at all, on the committee page).
    if (source.dmc_quorum != null) await setDraftDesignQuorum(tx, created.id, source.dmc_quorum);
    await appendAudit(tx, {
      actorUserId: user.id,
      actorEmail: user.email,
      trialId: trial.id,
      action: "design_amendment_started",
      entityType: "design",
      entityId: created.id,
      visibility: "open",
      oldValues: { fromVersion: source.version },
      newValues: { version: created.version, spec: source.spec },
      reason,
    });
    return created.id;
  });
  return (await fetchDesign(id)) as DesignRecord;
}

export { recordHash };
