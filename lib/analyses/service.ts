import "server-only";
/**
 * Interim data workflow: open a look, save counts, upload patient-level data, lock with an
 * e-signature, reopen as an amendment. Each write is one transaction holding the look's row lock,
 * checks the row_version the editor loaded (a stale version is a 409, never a lost update), and
 * appends exactly one audit row: "closed" when counts or outcomes are in it, "open" for status.
 *
 * A look is either patient-level (it has patient rows; its counts are always derived from them) or
 * count-level (no patient rows; counts typed in). Uploading a file makes it patient-level; only an
 * explicit switch with a reason (switchToCountLevel) removes the rows so counts can be typed, so
 * the patient rows and the counts can never disagree.
 *
 * Counts are checked against the locked design and the neighbouring locked looks when they are
 * saved, uploaded and again when the look is locked (countsProblems), so a locked look always holds
 * data the review can analyse.
 *
 * Each write takes the caller's TrialAccess (lib/auth: requireTrialAccess in route handlers,
 * checkTrialAccess in tests) and re-checks enterData itself before it reads or writes anything: a
 * service is callable from anywhere, so it does not trust that its caller checked. It acts on
 * access.trial only.
 */
import { createHash } from "node:crypto";
import { db, writeTransaction, type Tx } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { fetchAnalysisForUpdate, fetchNeighbourCutoffs, updateAnalysisOpenFields, type AnalysisLockedRow } from "@/db/queries/analyses";
import {
  armCountsOf,
  countPatientOutcomes,
  deleteCachedReviews,
  deletePatientOutcomes,
  fetchArmCounts,
  fetchNeighbourLockedCounts,
  replaceArmCounts,
  replacePatientOutcomes,
  type ArmCountsInput,
} from "@/db/queries/closed";
import { fetchAnalysisOpen } from "@/db/queries/open-status";
import { fetchArms } from "@/db/queries/trials";
import { fetchDesign } from "@/db/queries/designs";
import { insertSignature } from "@/db/queries/signatures";
import type { AnalysisOpenRow, ArmRow, PublicUser } from "@/db/types";
import { assertCapability, closedConnection, type TrialAccess } from "@/lib/auth";
import { HttpError, conflict, notFoundError } from "@/lib/http";
import { confirmSigner } from "@/lib/auth/signature";
import { decodeCsvBytes, NotCsvError, parsePatientCsv, type ArmRef, type PatientCsvResult } from "@/lib/csv/patient-outcomes";
import type { ExcludedRows } from "@/lib/csv/patient-outcomes";
import { lockAnalysisSchema, openLookSchema, reopenAnalysisSchema, saveCountsSchema, switchToCountLevelSchema, withinLookProblems } from "./schemas";

/** maxPerArm: the look's design's maximum sample size (nMax; per arm for two arms); null without a design. */
export type LookContext = { analysis: AnalysisOpenRow; arms: ArmRow[]; safetyRule: boolean; maxPerArm: number | null };

/** The look, its trial's arms and what its design allows; 404 if not on this trial. */
export async function loadLookContext(trialId: number, analysisId: number, tx: Tx = db): Promise<LookContext> {
  const analysis = await fetchAnalysisOpen(analysisId, tx);
  if (!analysis || analysis.trial_id !== trialId) throw notFoundError("That look");
  const [arms, design] = await Promise.all([fetchArms(trialId, tx), fetchDesign(analysis.design_id, tx)]);
  const maxPerArm = !design ? null : design.spec.arms === "single" ? design.spec.nMax : design.spec.nMaxPerArm;
  return { analysis, arms, safetyRule: !!design?.spec.safety, maxPerArm };
}

type CountsProblem = { path: string; message: string };
type NeighbourCounts = Awaited<ReturnType<typeof fetchNeighbourLockedCounts>>;

const MONOTONE_FIELDS = [
  ["enrolled", "enrolled"],
  ["treated", "treated"],
  ["evaluable", "evaluable for response"],
  ["responders", "responders"],
  ["toxicities", "with toxicity"],
] as const;

/**
 * Everything that would stop the review from analysing these counts, or that cannot be true of
 * cumulative data: the within-look rules against the design's maximum sample size, treated and
 * toxicities present exactly when the design has a safety rule, and no count falling below the
 * previous locked look's or rising above the next locked look's. Pure; paths are
 * `counts.<index>.<field>` so a form can show each message beside its input.
 */
function countsProblems(ctx: LookContext, counts: ArmCountsInput[], neighbours: NeighbourCounts): CountsProblem[] {
  const out: CountsProblem[] = [];
  const label = (armId: number) => ctx.arms.find((a) => a.id === armId)?.label ?? `arm ${armId}`;
  counts.forEach((c, i) => {
    const at = (field: string) => `counts.${i}.${field}`;
    if (ctx.safetyRule && (c.treated === null || c.toxicities === null))
      out.push({ path: at(c.treated === null ? "treated" : "toxicities"), message: `${label(c.armId)}: the design has a safety rule, so the number treated and the number with toxicity are both needed.` });
    if (!ctx.safetyRule && (c.treated !== null || c.toxicities !== null))
      out.push({ path: at("toxicities"), message: `${label(c.armId)}: the design has no safety rule, so treated and toxicity counts are not recorded.` });
    for (const p of withinLookProblems(c, ctx.maxPerArm)) out.push({ path: at(p.path), message: `${label(c.armId)}: ${p.message}` });
    for (const [side, n] of [
      ["before", neighbours.before],
      ["after", neighbours.after],
    ] as const) {
      const other = n?.counts.find((x) => x.arm_id === c.armId);
      if (!n || !other) continue;
      for (const [field, words] of MONOTONE_FIELDS) {
        const mine = c[field];
        const theirs = other[field];
        if (mine === null || theirs === null) continue;
        if (side === "before" && mine < theirs)
          out.push({ path: at(field), message: `${label(c.armId)}: ${words} (${mine}) is below the ${theirs} of locked look ${n.lookNumber}; counts are cumulative and cannot fall from one look to the next.` });
        if (side === "after" && mine > theirs)
          out.push({ path: at(field), message: `${label(c.armId)}: ${words} (${mine}) is above the ${theirs} of the later locked look ${n.lookNumber}; counts are cumulative and cannot fall from one look to the next.` });
      }
    }
  });
  return out;
}

function refuseProblems(problems: CountsProblem[], what: string): void {
  if (!problems.length) return;
  throw new HttpError(422, `${what}: ${problems[0].message}${problems.length > 1 ? ` (and ${problems.length - 1} more problem${problems.length > 2 ? "s" : ""})` : ""}`, { issues: problems });
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

export async function openLookForEntry(access: TrialAccess, analysisId: number, body: unknown) {
  assertCapability(access, "enterData");
  const { user: actor, trial: { id: trialId } } = access;
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

export async function saveArmCounts(access: TrialAccess, analysisId: number, body: unknown) {
  assertCapability(access, "enterData");
  const { user: actor, trial: { id: trialId } } = access;
  const ctx = await loadLookContext(trialId, analysisId);
  const input = saveCountsSchema({ armIds: ctx.arms.map((x) => x.id), safetyRule: ctx.safetyRule, maxPerArm: ctx.maxPerArm }).parse(body);
  const counts: ArmCountsInput[] = input.counts.map((c) => ({
    armId: c.armId,
    enrolled: c.enrolled,
    treated: c.treated ?? null,
    evaluable: c.evaluable,
    responders: c.responders,
    toxicities: c.toxicities ?? null,
    pending: c.pending ?? 0,
  }));
  return writeTransaction(async (tx) => {
    const a = await lockLook(tx, trialId, analysisId, input.rowVersion);
    requireOpenForEntry(a);
    const patientRows = await countPatientOutcomes(a.id, tx);
    if (patientRows > 0)
      throw conflict(
        `Look ${a.look_number} is patient-level: its counts are derived from its ${patientRows} uploaded patient rows, so they cannot be typed in. Correct the file and upload it again, or switch the look to count-level entry (this removes the patient rows and needs a reason).`,
      );
    await checkCutoffOrder(tx, a, input.cutoffDate);
    refuseProblems(countsProblems(ctx, counts, await fetchNeighbourLockedCounts(trialId, a.look_number, tx)), "The counts were not saved");
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

/** Pending appears only when some are pending, so records signed before the column existed read the same. */
function plainCounts(c: { arm_id: number; enrolled: number; treated: number | null; evaluable: number; responders: number; toxicities: number | null; pending?: number }) {
  // Pending only when there are some, so a record signed before pending counts existed reads the same.
  const { pending, ...rest } = armCountsOf(c);
  return pending ? { ...rest, pending } : rest;
}

function armRefs(arms: ArmRow[]): ArmRef[] {
  return arms.map((a) => ({ id: a.id, label: a.label, role: a.arm_role }));
}

/** `excluded`: rows enrolled after the cut-off, left out of the look (not an error). */
type UploadPreview =
  | {
      ok: true;
      rowCount: number;
      includedRows: number;
      counts: Array<{ armId: number; armLabel: string; enrolled: number; treated: number | null; evaluable: number; responders: number; toxicities: number | null; pending: number }>;
      cutoffDate: string;
      excluded: ExcludedRows;
    }
  | { ok: false; rowCount: number; issueCount: number; issues: Array<{ line: number | null; column: string | null; message: string }>; excluded: ExcludedRows };

/** Parses and validates a file against a look without writing anything. */
function checkUpload(ctx: LookContext, bytes: Uint8Array): { result: PatientCsvResult; preview: UploadPreview } {
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
    if (e instanceof NotCsvError)
      result = { ok: false, issues: [{ line: null, column: null, message: e.message }], issueCount: 1, rowCount: 0, excluded: { count: 0, cutoffDate: ctx.analysis.cutoff_date, rows: [] } };
    else throw e;
  }
  const label = (id: number) => ctx.arms.find((x) => x.id === id)?.label ?? String(id);
  const preview: UploadPreview = result.ok
    ? {
        ok: true,
        rowCount: result.rowCount,
        includedRows: result.rows.length,
        cutoffDate: ctx.analysis.cutoff_date,
        counts: result.counts.map((c) => ({ ...c, armLabel: label(c.armId) })),
        excluded: result.excluded,
      }
    : { ok: false, rowCount: result.rowCount, issueCount: result.issueCount, issues: result.issues, excluded: result.excluded };
  return { result, preview };
}

/** The derived counts' problems against the design and the neighbouring locked looks, as file-level issues. */
function withCountsProblems(preview: UploadPreview, problems: CountsProblem[]): UploadPreview {
  if (!preview.ok || !problems.length) return preview;
  const issues = problems.map((p) => ({ line: null, column: null, message: `Counts derived from the file: ${p.message}` }));
  return { ok: false, rowCount: preview.rowCount, issueCount: issues.length, issues, excluded: preview.excluded };
}

/** Checks a file against a look and writes nothing; it reads the neighbouring locked looks' counts (closed data). */
export async function previewPatientUpload(access: TrialAccess, analysisId: number, bytes: Uint8Array): Promise<UploadPreview> {
  assertCapability(access, "enterData");
  const closed = closedConnection(access);
  const trialId = access.trial.id;
  const ctx = await loadLookContext(trialId, analysisId);
  const { result, preview } = checkUpload(ctx, bytes);
  if (!result.ok) return preview;
  return withCountsProblems(preview, countsProblems(ctx, result.counts, await fetchNeighbourLockedCounts(trialId, ctx.analysis.look_number, closed)));
}

/**
 * Re-validates the file (a preview is never trusted), then replaces the look's patient rows and
 * counts in one transaction. Any bad row, or any failure on the way, writes nothing.
 */
export async function confirmPatientUpload(access: TrialAccess, analysisId: number, bytes: Uint8Array, opts: { rowVersion: number; fileName?: string }) {
  assertCapability(access, "enterData");
  const { user: actor, trial: { id: trialId } } = access;
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
    const problems = countsProblems(ctx, result.counts, await fetchNeighbourLockedCounts(trialId, a.look_number, tx));
    if (problems.length)
      throw new HttpError(422, `The file was not saved: ${problems[0].message}`, {
        issues: problems.map((p) => ({ line: null, column: null, message: `Counts derived from the file: ${p.message}` })),
        issueCount: problems.length,
      });
    const [oldCounts, oldRows] = await Promise.all([fetchArmCounts(a.id, tx), countPatientOutcomes(a.id, tx)]);
    await replacePatientOutcomes(
      tx,
      a.id,
      result.rows.map((r) => ({
        subject_id: r.subjectId,
        arm_id: r.armId,
        enrolled_on: r.enrolledOn,
        evaluable: r.evaluable,
        outcome_pending: r.pending,
        responder: r.responder,
        treated: r.treated,
        toxicity: r.toxicity,
        source_line: r.sourceLine,
      })),
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
      newValues: {
        lookNumber: a.look_number,
        amendment: a.amendment_count,
        cutoffDate: a.cutoff_date,
        fileName: opts.fileName ?? null,
        fileSha256,
        patientRows: result.rows.length,
        excludedAfterCutoff: { count: result.excluded.count, lines: result.excluded.rows.map((r) => r.line) },
        enrolledTotal,
        counts: result.counts,
      },
    });
    return { rowVersion: a.row_version + 1, patientRows: result.rows.length, enrolledTotal, counts: preview.counts, excluded: result.excluded };
  });
}

/** Locks a look with the statistician's e-signature over its cut-off and counts. */
export async function lockAnalysis(access: TrialAccess, analysisId: number, body: unknown) {
  assertCapability(access, "enterData");
  const { user: actor, trial: { id: trialId } } = access;
  const input = lockAnalysisSchema.parse(body);
  await confirmSigner(actor, input.password);
  const ctx = await loadLookContext(trialId, analysisId);
  return writeTransaction(async (tx) => {
    const a = await lockLook(tx, trialId, analysisId, input.rowVersion);
    requireOpenForEntry(a);
    const counts = await fetchArmCounts(a.id, tx);
    if (!a.cutoff_date || counts.length !== ctx.arms.length)
      throw conflict(`Look ${a.look_number} has no counts for every arm yet: enter or upload them before locking.`);
    // Checked again here: the design or a neighbouring look may have changed since the counts were saved.
    refuseProblems(
      countsProblems(
        ctx,
        counts.map(armCountsOf),
        await fetchNeighbourLockedCounts(trialId, a.look_number, tx),
      ),
      `Look ${a.look_number} was not locked`,
    );
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
export async function reopenAnalysis(access: TrialAccess, analysisId: number, body: unknown) {
  assertCapability(access, "enterData");
  const { user: actor, trial: { id: trialId } } = access;
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
    // The kept review describes the data about to be corrected (a relock gets a new input hash anyway).
    await deleteCachedReviews(a.id, tx);
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

/**
 * Makes a patient-level look count-level: removes its patient rows (the counts stay as they are, to
 * be corrected by hand) and records the switch with its reason as a closed audit entry (the old
 * row count and the counts they gave). Uploading a file later makes the look patient-level again.
 */
export async function switchToCountLevel(access: TrialAccess, analysisId: number, body: unknown) {
  assertCapability(access, "enterData");
  const { user: actor, trial: { id: trialId } } = access;
  const input = switchToCountLevelSchema.parse(body);
  return writeTransaction(async (tx) => {
    const a = await lockLook(tx, trialId, analysisId, input.rowVersion);
    requireOpenForEntry(a);
    const counts = await fetchArmCounts(a.id, tx);
    const removed = await deletePatientOutcomes(tx, a.id);
    if (removed === 0) throw conflict(`Look ${a.look_number} has no patient rows: it is already count-level, so its counts can be typed in.`);
    await bump(tx, a, {});
    await appendAudit(tx, {
      ...actorFields(actor),
      trialId,
      action: "switched_to_count_level",
      entityType: "analysis",
      entityId: a.id,
      visibility: "closed",
      oldValues: { lookNumber: a.look_number, dataLevel: "patient", patientRows: removed, counts: counts.map(plainCounts) },
      newValues: { lookNumber: a.look_number, amendment: a.amendment_count, dataLevel: "count", patientRows: 0 },
      reason: input.reason,
    });
    return { rowVersion: a.row_version + 1, dataLevel: "count" as const, removedPatientRows: removed };
  });
}
