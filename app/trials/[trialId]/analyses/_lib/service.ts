import "server-only";
/**
 * Interim data workflow: open a look, save counts, upload patient-level data, lock with an
 * e-signature, reopen as an amendment. Each write is one transaction holding the look's row lock,
 * checks the row_version the editor loaded (a stale version is a 409, never a lost update), and
 * appends exactly one audit row: "closed" when counts or outcomes are in it, "open" for status.
 *
 * Callers (route handlers, tests) have already authorized the actor with enterData.
 */
import { createHash } from "node:crypto";
import { db, writeTransaction, type Tx } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { fetchAnalysisForUpdate, fetchNeighbourCutoffs, updateAnalysisOpenFields, type AnalysisLockedRow } from "@/db/queries/analyses";
import { fetchArmCounts, replaceArmCounts, replacePatientOutcomes, countPatientOutcomes, type ArmCountsInput } from "@/db/queries/closed";
import { fetchAnalysisOpen } from "@/db/queries/open-status";
import { fetchArms } from "@/db/queries/trials";
import { fetchDesign } from "@/db/queries/designs";
import { insertSignature } from "@/db/queries/signatures";
import type { AnalysisOpenRow, ArmRow, PublicUser } from "@/db/types";
import { HttpError, conflict, notFoundError } from "@/lib/http";
import { confirmSigner } from "@/lib/auth/signature";
import { decodeCsvBytes, NotCsvError, parsePatientCsv, type ArmRef, type PatientCsvResult } from "@/lib/csv/patient-outcomes";
import { lockAnalysisSchema, openLookSchema, reopenAnalysisSchema, saveCountsSchema } from "./schemas";

export type LookContext = { analysis: AnalysisOpenRow; arms: ArmRow[]; safetyRule: boolean };

/** The look, its trial's arms and whether its design has a safety rule; 404 if not on this trial. */
export async function loadLookContext(trialId: number, analysisId: number, tx: Tx = db): Promise<LookContext> {
  const analysis = await fetchAnalysisOpen(analysisId, tx);
  if (!analysis || analysis.trial_id !== trialId) throw notFoundError("That look");
  const [arms, design] = await Promise.all([fetchArms(trialId, tx), fetchDesign(analysis.design_id, tx)]);
  return { analysis, arms, safetyRule: !!design?.spec.safety };
}

async function lockLook(tx: Tx, trialId: number, analysisId: number, rowVersion: number): Promise<AnalysisLockedRow> {
  const a = await fetchAnalysisForUpdate(tx, analysisId);
  if (!a || a.trial_id !== trialId) throw notFoundError("That look");
  if (a.row_version !== rowVersion)
    throw new HttpError(
      409,
      `Someone else saved look ${a.look_number} after you opened it (you had version ${rowVersion}, it is now version ${a.row_version}). Your changes were not saved: reload the page to see theirs, then enter yours again.`,
      { currentRowVersion: a.row_version },
    );
  return a;
}

function requireOpenForEntry(a: AnalysisLockedRow) {
  if (a.status === "planned") throw conflict(`Look ${a.look_number} is still planned: open it for entry and set its data cut-off first.`);
  if (a.status === "locked") throw conflict(`Look ${a.look_number} is locked and cannot change. A correction needs a reason: reopen it as an amendment.`);
  if (a.status === "reviewed") throw conflict(`Look ${a.look_number} has been reviewed by the DMC and cannot change.`);
}

/** Mark the stale-version race explicitly too: updateAnalysisOpenFields re-checks row_version. */
async function bump(tx: Tx, a: AnalysisLockedRow, fields: Parameters<typeof updateAnalysisOpenFields>[3]) {
  const ok = await updateAnalysisOpenFields(tx, a.id, a.row_version, fields);
  if (!ok) throw conflict(`Someone else saved look ${a.look_number} at the same moment; nothing was saved. Reload the page.`);
}

async function checkCutoffOrder(tx: Tx, a: AnalysisLockedRow, cutoff: string) {
  const { before, after } = await fetchNeighbourCutoffs(a.trial_id, a.look_number, tx);
  if (before && cutoff <= before)
    throw new HttpError(422, `The data cut-off must be after the previous look's cut-off (${before}).`, { issues: [{ path: "cutoffDate", message: `Must be after ${before}, the previous look's cut-off.` }] });
  if (after && cutoff >= after)
    throw new HttpError(422, `The data cut-off must be before the next look's cut-off (${after}).`, { issues: [{ path: "cutoffDate", message: `Must be before ${after}, the next look's cut-off.` }] });
}

const actorFields = (actor: PublicUser) => ({ actorUserId: actor.id, actorEmail: actor.email });

export async function openLookForEntry(actor: PublicUser, trialId: number, analysisId: number, body: unknown) {
  const input = openLookSchema.parse(body);
  return writeTransaction(async (tx) => {
    const a = await lockLook(tx, trialId, analysisId, input.rowVersion);
    if (a.status !== "planned") throw conflict(`Look ${a.look_number} is already ${a.status === "open" ? "open for entry" : a.status}.`);
    await checkCutoffOrder(tx, a, input.cutoffDate);
    await bump(tx, a, { status: "open", cutoff_date: input.cutoffDate });
    await appendAudit(tx, {
      ...actorFields(actor),
      trialId,
      action: "analysis_opened",
      entityType: "analysis",
      entityId: a.id,
      visibility: "open",
      oldValues: { lookNumber: a.look_number, status: a.status, cutoffDate: a.cutoff_date },
      newValues: { lookNumber: a.look_number, status: "open", cutoffDate: input.cutoffDate },
    });
    return { rowVersion: a.row_version + 1 };
  });
}

export async function saveArmCounts(actor: PublicUser, trialId: number, analysisId: number, body: unknown) {
  const ctx = await loadLookContext(trialId, analysisId);
  const input = saveCountsSchema({ armIds: ctx.arms.map((x) => x.id), safetyRule: ctx.safetyRule }).parse(body);
  const counts: ArmCountsInput[] = input.counts.map((c) => ({ armId: c.armId, enrolled: c.enrolled, evaluable: c.evaluable, responders: c.responders, toxicities: c.toxicities ?? null }));
  return writeTransaction(async (tx) => {
    const a = await lockLook(tx, trialId, analysisId, input.rowVersion);
    requireOpenForEntry(a);
    await checkCutoffOrder(tx, a, input.cutoffDate);
    const old = await fetchArmCounts(a.id, tx);
    await replaceArmCounts(tx, a.id, counts);
    const enrolledTotal = counts.reduce((s, c) => s + c.enrolled, 0);
    await bump(tx, a, { cutoff_date: input.cutoffDate, enrolled_total: enrolledTotal });
    await appendAudit(tx, {
      ...actorFields(actor),
      trialId,
      action: "counts_entered",
      entityType: "analysis",
      entityId: a.id,
      visibility: "closed",
      oldValues: old.length ? { cutoffDate: a.cutoff_date, enrolledTotal: a.enrolled_total, counts: old.map(plainCounts) } : undefined,
      newValues: { lookNumber: a.look_number, amendment: a.amendment_count, cutoffDate: input.cutoffDate, enrolledTotal, counts },
      reason: input.reason || null,
    });
    return { rowVersion: a.row_version + 1, enrolledTotal, counts };
  });
}

function plainCounts(c: { arm_id: number; enrolled: number; evaluable: number; responders: number; toxicities: number | null }) {
  return { armId: c.arm_id, enrolled: c.enrolled, evaluable: c.evaluable, responders: c.responders, toxicities: c.toxicities };
}

function armRefs(arms: ArmRow[]): ArmRef[] {
  return arms.map((a) => ({ id: a.id, label: a.label, role: a.arm_role }));
}

export type UploadPreview =
  | { ok: true; rowCount: number; counts: Array<{ armId: number; armLabel: string; enrolled: number; evaluable: number; responders: number; toxicities: number | null }>; cutoffDate: string }
  | { ok: false; rowCount: number; issueCount: number; issues: Array<{ line: number | null; column: string | null; message: string }> };

/** Parses and validates a file against a look without writing anything. */
export function checkUpload(ctx: LookContext, bytes: Uint8Array): { result: PatientCsvResult; preview: UploadPreview } {
  if (ctx.analysis.status !== "open" || !ctx.analysis.cutoff_date) {
    const msg =
      ctx.analysis.status === "planned"
        ? `Look ${ctx.analysis.look_number} is still planned: open it for entry and set its data cut-off first.`
        : `Look ${ctx.analysis.look_number} is ${ctx.analysis.status} and cannot change. A correction needs a reason: reopen it as an amendment.`;
    throw conflict(msg);
  }
  let result: PatientCsvResult;
  try {
    result = parsePatientCsv(decodeCsvBytes(bytes), { arms: armRefs(ctx.arms), cutoffDate: ctx.analysis.cutoff_date, safetyRule: ctx.safetyRule });
  } catch (e) {
    if (e instanceof NotCsvError) result = { ok: false, issues: [{ line: null, column: null, message: e.message }], issueCount: 1, rowCount: 0 };
    else throw e;
  }
  const label = (id: number) => ctx.arms.find((x) => x.id === id)?.label ?? String(id);
  const preview: UploadPreview = result.ok
    ? { ok: true, rowCount: result.rowCount, cutoffDate: ctx.analysis.cutoff_date, counts: result.counts.map((c) => ({ ...c, armLabel: label(c.armId) })) }
    : { ok: false, rowCount: result.rowCount, issueCount: result.issueCount, issues: result.issues };
  return { result, preview };
}

export async function previewPatientUpload(trialId: number, analysisId: number, bytes: Uint8Array): Promise<UploadPreview> {
  return checkUpload(await loadLookContext(trialId, analysisId), bytes).preview;
}

/**
 * Re-validates the file (a preview is never trusted), then replaces the look's patient rows and
 * counts in one transaction. Any bad row, or any failure on the way, writes nothing.
 */
export async function confirmPatientUpload(actor: PublicUser, trialId: number, analysisId: number, bytes: Uint8Array, opts: { rowVersion: number; fileName?: string }) {
  const ctx = await loadLookContext(trialId, analysisId);
  const { result, preview } = checkUpload(ctx, bytes);
  if (!result.ok || !preview.ok)
    throw new HttpError(422, "The file has problems, so nothing was saved. Correct them and upload it again.", { issues: preview.ok ? [] : preview.issues, issueCount: result.ok ? 0 : result.issueCount });
  const fileSha256 = createHash("sha256").update(bytes).digest("hex");
  return writeTransaction(async (tx) => {
    const a = await lockLook(tx, trialId, analysisId, opts.rowVersion);
    requireOpenForEntry(a);
    // The cut-off the file was checked against must still be the look's cut-off.
    if (a.cutoff_date !== ctx.analysis.cutoff_date) throw conflict("The look's data cut-off changed while the file was checked; reload and upload again.");
    const [oldCounts, oldRows] = await Promise.all([fetchArmCounts(a.id, tx), countPatientOutcomes(a.id, tx)]);
    await replacePatientOutcomes(
      tx,
      a.id,
      result.rows.map((r) => ({ subject_id: r.subjectId, arm_id: r.armId, enrolled_on: r.enrolledOn, evaluable: r.evaluable, responder: r.responder, toxicity: r.toxicity, source_line: r.sourceLine })),
    );
    await replaceArmCounts(tx, a.id, result.counts);
    const enrolledTotal = result.counts.reduce((s, c) => s + c.enrolled, 0);
    await bump(tx, a, { enrolled_total: enrolledTotal });
    await appendAudit(tx, {
      ...actorFields(actor),
      trialId,
      action: "patient_data_uploaded",
      entityType: "analysis",
      entityId: a.id,
      visibility: "closed",
      oldValues: oldCounts.length || oldRows ? { patientRows: oldRows, enrolledTotal: a.enrolled_total, counts: oldCounts.map(plainCounts) } : undefined,
      newValues: { lookNumber: a.look_number, amendment: a.amendment_count, cutoffDate: a.cutoff_date, fileName: opts.fileName ?? null, fileSha256, patientRows: result.rows.length, enrolledTotal, counts: result.counts },
    });
    return { rowVersion: a.row_version + 1, patientRows: result.rows.length, enrolledTotal, counts: preview.counts };
  });
}

/** Locks a look with the statistician's e-signature over its cut-off and counts. */
export async function lockAnalysis(actor: PublicUser, trialId: number, analysisId: number, body: unknown) {
  const input = lockAnalysisSchema.parse(body);
  await confirmSigner(actor, input.password);
  const ctx = await loadLookContext(trialId, analysisId);
  return writeTransaction(async (tx) => {
    const a = await lockLook(tx, trialId, analysisId, input.rowVersion);
    requireOpenForEntry(a);
    const counts = await fetchArmCounts(a.id, tx);
    if (!a.cutoff_date || counts.length !== ctx.arms.length)
      throw conflict(`Look ${a.look_number} has no counts for every arm yet: enter or upload them before locking.`);
    const record = { trialId, analysisId: a.id, lookNumber: a.look_number, amendment: a.amendment_count, cutoffDate: a.cutoff_date, counts: counts.map(plainCounts) };
    const sig = await insertSignature(tx, {
      userId: actor.id,
      signerName: actor.name,
      signerEmail: actor.email,
      meaning: "analysis locked",
      entityType: "analysis",
      entityId: a.id,
      record,
    });
    await bump(tx, a, { status: "locked", locked_at: sig.signed_at, lock_signature_id: sig.id });
    await appendAudit(tx, {
      ...actorFields(actor),
      trialId,
      action: "analysis_locked",
      entityType: "analysis",
      entityId: a.id,
      visibility: "open",
      oldValues: { status: a.status },
      newValues: { lookNumber: a.look_number, status: "locked", cutoffDate: a.cutoff_date, enrolledTotal: a.enrolled_total, amendment: a.amendment_count, signatureId: sig.id, meaning: sig.meaning, recordHash: sig.record_hash },
    });
    return { rowVersion: a.row_version + 1, signatureId: sig.id, lockedAt: sig.signed_at };
  });
}

/**
 * Reopens a locked look for a correction: needs a reason, counts as an amendment. A reviewed look
 * can be reopened too, with an e-signature (password asked again): that starts a new review
 * version, and the recommendations made on the earlier one are superseded (never edited).
 * The reason is free text about closed data, so it goes to a closed audit row; the open row says
 * only that a correction was opened.
 */
export async function reopenAnalysis(actor: PublicUser, trialId: number, analysisId: number, body: unknown) {
  const input = reopenAnalysisSchema.parse(body);
  const current = await fetchAnalysisOpen(analysisId);
  const afterReview = current?.trial_id === trialId && current.status === "reviewed";
  if (afterReview) {
    if (!input.password)
      throw new HttpError(422, "A reviewed look is reopened with your e-signature: enter your password.", { issues: [{ path: "password", message: "Enter your password to sign." }] });
    await confirmSigner(actor, input.password);
  }
  return writeTransaction(async (tx) => {
    const a = await lockLook(tx, trialId, analysisId, input.rowVersion);
    if (a.status === "reviewed" && !afterReview) throw conflict(`Look ${a.look_number} was reviewed meanwhile; reload the page and sign the reopening.`);
    if (a.status !== "locked" && a.status !== "reviewed") throw conflict(`Look ${a.look_number} is not locked, so there is nothing to reopen.`);
    const amendment = a.amendment_count + 1;
    const reviewVersion = a.status === "reviewed" ? a.review_version + 1 : a.review_version;
    const sig =
      a.status === "reviewed"
        ? await insertSignature(tx, {
            userId: actor.id,
            signerName: actor.name,
            signerEmail: actor.email,
            meaning: "review reopened for correction",
            entityType: "analysis",
            entityId: a.id,
            record: { trialId, analysisId: a.id, lookNumber: a.look_number, reviewVersion: a.review_version, newReviewVersion: reviewVersion, amendment, reason: input.reason },
          })
        : null;
    await bump(tx, a, { status: "open", locked_at: null, lock_signature_id: null, amendment_count: amendment, review_version: reviewVersion, ...(sig ? { reviewed_at: null } : {}) });
    const action = sig ? "review_reopened_for_correction" : "analysis_reopened_for_amendment";
    await appendAudit(tx, {
      ...actorFields(actor),
      trialId,
      action,
      entityType: "analysis",
      entityId: a.id,
      visibility: "open",
      oldValues: { lookNumber: a.look_number, status: a.status, lockedAt: a.locked_at, signatureId: a.lock_signature_id, amendment: a.amendment_count, reviewVersion: a.review_version },
      newValues: { lookNumber: a.look_number, status: "open", amendment, reviewVersion, ...(sig ? { signatureId: sig.id, meaning: sig.meaning, signer: sig.signer_name } : {}) },
    });
    await appendAudit(tx, {
      ...actorFields(actor),
      trialId,
      action: "correction_reason_recorded",
      entityType: "analysis",
      entityId: a.id,
      visibility: "closed",
      newValues: { lookNumber: a.look_number, amendment, reviewVersion, ...(sig ? { signatureId: sig.id, recordHash: sig.record_hash } : {}) },
      reason: input.reason,
    });
    return { rowVersion: a.row_version + 1, amendment, reviewVersion, signatureId: sig?.id ?? null };
  });
}
