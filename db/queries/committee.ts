import "server-only";
/**
 * The DMC as a committee, open side: who sits on it (chair, voting members, the independent
 * statistician), the quorum of the charter version, attendance per session, conflict-of-interest
 * declarations, open minutes, and the recommendation letters. Nothing here selects a vote, a
 * comment, a tally or a closed-session minute (db/queries/committee-closed.ts does, with a
 * ClosedReader); minutes are read here through the view meeting_minutes_open only.
 */
import { blindDb, db, type Tx } from "../knex";
import type { CommitteeRole, MinutesSession } from "../types";

export type CommitteeMember = { id: number; userId: number; name: string; email: string; role: CommitteeRole; rowVersion: number };

export async function fetchCommittee(trialId: number, tx: Tx = blindDb): Promise<CommitteeMember[]> {
  return tx("committee_members as c")
    .join("users as u", "u.id", "c.user_id")
    .where("c.trial_id", trialId)
    .select("c.id", "c.user_id as userId", "u.name", "u.email", "c.member_role as role", "c.row_version as rowVersion")
    .orderByRaw("FIELD(c.member_role, 'chair', 'voting', 'statistician'), u.name");
}

export const isVoting = (m: Pick<CommitteeMember, "role">) => m.role === "chair" || m.role === "voting";

export async function insertCommitteeMember(tx: Tx, m: { trialId: number; userId: number; role: CommitteeRole; createdBy: number }): Promise<number> {
  const [id] = await tx("committee_members").insert({
    trial_id: m.trialId,
    user_id: m.userId,
    member_role: m.role,
    chair_of_trial_id: m.role === "chair" ? m.trialId : null,
    created_by: m.createdBy,
  });
  return id;
}

/** Locks the committee rows of a trial so two administrators' changes queue. */
export async function lockCommittee(tx: Tx, trialId: number): Promise<void> {
  await tx("committee_members").where({ trial_id: trialId }).forUpdate().select("id");
}

/** Sets a member's role; the chair's row carries chair_of_trial_id. Returns false on a stale row version. */
export async function updateCommitteeRole(tx: Tx, memberId: number, rowVersion: number, trialId: number, role: CommitteeRole): Promise<boolean> {
  const n = await tx("committee_members")
    .where({ id: memberId, row_version: rowVersion, trial_id: trialId })
    .update({ member_role: role, chair_of_trial_id: role === "chair" ? trialId : null, row_version: rowVersion + 1 });
  return n === 1;
}

/**
 * The quorum written in the design version a look was locked under (the charter version), or null
 * when that version has none (the committee then needs a majority of its voting members).
 */
export async function fetchCharterQuorum(analysisId: number, tx: Tx = blindDb): Promise<{ quorum: number | null; designVersion: number } | undefined> {
  const r = await tx("analyses as a").join("designs as d", "d.id", "a.design_id").where("a.id", analysisId).first("d.dmc_quorum as quorum", "d.version as designVersion");
  return r ? { quorum: r.quorum === null ? null : Number(r.quorum), designVersion: Number(r.designVersion) } : undefined;
}

/** The quorum in force: the charter's number, or a majority of the voting members (common practice, no source). */
export function quorumInForce(charterQuorum: number | null, votingMembers: number): number {
  return charterQuorum ?? Math.floor(votingMembers / 2) + 1;
}

/** The latest draft design version of a trial (where the quorum may still be written), locked for a write. */
export async function fetchDraftDesignForUpdate(tx: Tx, trialId: number): Promise<{ id: number; version: number; dmcQuorum: number | null; rowVersion: number } | undefined> {
  return tx("designs").where({ trial_id: trialId, status: "draft" }).forUpdate().first("id", "version", "dmc_quorum as dmcQuorum", "row_version as rowVersion");
}

/** Writes the quorum into a draft design version (a locked one is never changed); bumps its row version so a lock started before sees the change. */
export async function setDraftDesignQuorum(tx: Tx, designId: number, quorum: number | null): Promise<boolean> {
  const n = await tx("designs").where({ id: designId, status: "draft" }).update({ dmc_quorum: quorum, row_version: tx.raw("row_version + 1") });
  return n === 1;
}

type SessionAttendance = { userId: number; name: string; session: MinutesSession; attended: boolean; recordedAt: Date };

export async function fetchSessionAttendance(meetingId: number, tx: Tx = blindDb): Promise<SessionAttendance[]> {
  const rows = await tx("meeting_session_attendance as s")
    .join("users as u", "u.id", "s.user_id")
    .where("s.meeting_id", meetingId)
    .select("s.user_id as userId", "u.name", "s.session", "s.attended", "s.recorded_at as recordedAt")
    .orderBy(["s.session", "u.name"]);
  return rows.map((r: SessionAttendance & { attended: number | boolean }) => ({ ...r, attended: Boolean(r.attended) }));
}

/** Replaces one session's attendance record of a meeting (the caller owns the transaction and the audit row). */
export async function replaceSessionAttendance(tx: Tx, meetingId: number, session: MinutesSession, rows: Array<{ userId: number; attended: boolean }>, recordedBy: number, now: Date): Promise<void> {
  await tx("meeting_session_attendance").where({ meeting_id: meetingId, session }).del();
  for (const r of rows) await tx("meeting_session_attendance").insert({ meeting_id: meetingId, user_id: r.userId, session, attended: r.attended, recorded_by: recordedBy, recorded_at: now });
}

type ConflictDeclaration = { userId: number; name: string; hasConflict: boolean; statement: string | null; signatureId: number; signerName: string; declaredAt: Date };

export async function fetchDeclarations(meetingId: number, tx: Tx = blindDb): Promise<ConflictDeclaration[]> {
  const rows = await tx("conflict_declarations as d")
    .join("users as u", "u.id", "d.user_id")
    .join("signatures_open as s", "s.id", "d.signature_id")
    .where("d.meeting_id", meetingId)
    .select("d.user_id as userId", "u.name", "d.has_conflict as hasConflict", "d.statement", "d.signature_id as signatureId", "s.signer_name as signerName", "d.created_at as declaredAt")
    .orderBy("u.name");
  return rows.map((r: ConflictDeclaration & { hasConflict: number | boolean }) => ({ ...r, hasConflict: Boolean(r.hasConflict) }));
}

export async function insertDeclaration(tx: Tx, d: { meetingId: number; userId: number; hasConflict: boolean; statement: string | null; signatureId: number; now: Date }): Promise<number> {
  const [id] = await tx("conflict_declarations").insert({ meeting_id: d.meetingId, user_id: d.userId, has_conflict: d.hasConflict, statement: d.statement, signature_id: d.signatureId, created_at: d.now });
  return id;
}

export type MinutesVersion = { id: number; meetingId: number; session: MinutesSession; version: number; body: string; approved: boolean; approvedAt: Date | null; approvedBy: string | null; rowVersion: number; createdAt: Date; updatedAt: Date };

const minutesColumns = (alias: string) => [
  `${alias}.id`,
  `${alias}.meeting_id as meetingId`,
  `${alias}.session`,
  `${alias}.version`,
  `${alias}.body`,
  `${alias}.approved_at as approvedAt`,
  `${alias}.row_version as rowVersion`,
  `${alias}.created_at as createdAt`,
  `${alias}.updated_at as updatedAt`,
  "s.signer_name as approvedBy",
];
export const toMinutes = (r: Omit<MinutesVersion, "approved">): MinutesVersion => ({ ...r, approved: r.approvedBy !== null && r.approvedBy !== undefined });

/** Open-session minutes, every version, newest first (through the view: never a closed row). */
export async function fetchOpenMinutes(meetingId: number, tx: Tx = blindDb): Promise<MinutesVersion[]> {
  const rows = await tx("meeting_minutes_open as m")
    .leftJoin("signatures_open as s", "s.id", "m.approval_signature_id")
    .where("m.meeting_id", meetingId)
    .select(minutesColumns("m"))
    .orderBy("m.version", "desc");
  return rows.map(toMinutes);
}

/** The latest version of one session's minutes, locked for a write (the service has checked the session against the caller). */
export async function fetchLatestMinutesForUpdate(tx: Tx, meetingId: number, session: MinutesSession): Promise<{ id: number; version: number; body: string; approvalSignatureId: number | null; rowVersion: number } | undefined> {
  return tx("meeting_minutes")
    .where({ meeting_id: meetingId, session })
    .orderBy("version", "desc")
    .forUpdate()
    .first("id", "version", "body", "approval_signature_id as approvalSignatureId", "row_version as rowVersion");
}

export async function insertMinutesVersion(tx: Tx, m: { meetingId: number; session: MinutesSession; version: number; body: string; createdBy: number; now: Date }): Promise<number> {
  const [id] = await tx("meeting_minutes").insert({ meeting_id: m.meetingId, session: m.session, version: m.version, body: m.body, created_by: m.createdBy, created_at: m.now, updated_at: m.now });
  return id;
}

/** Edits a draft. An approved version is refused here and by a trigger. Returns false when stale or approved. */
export async function updateMinutesDraft(tx: Tx, id: number, rowVersion: number, body: string, now: Date): Promise<boolean> {
  const n = await tx("meeting_minutes").where({ id, row_version: rowVersion }).whereNull("approval_signature_id").update({ body, row_version: rowVersion + 1, updated_at: now });
  return n === 1;
}

export async function markMinutesApproved(tx: Tx, id: number, rowVersion: number, signatureId: number, now: Date): Promise<boolean> {
  const n = await tx("meeting_minutes").where({ id, row_version: rowVersion }).whereNull("approval_signature_id").update({ approval_signature_id: signatureId, approved_at: now, row_version: rowVersion + 1, updated_at: now });
  return n === 1;
}

type LetterMeta = { id: number; trialId: number; meetingId: number; recommendationId: number; version: number; contentHash: string; pageCount: number; byteSize: number; signerName: string; createdAt: Date };

const LETTER_COLUMNS = ["l.id", "l.trial_id as trialId", "l.meeting_id as meetingId", "l.recommendation_id as recommendationId", "l.version", "l.content_hash as contentHash", "l.page_count as pageCount", "l.byte_size as byteSize", "s.signer_name as signerName", "l.created_at as createdAt"];

export async function fetchLetters(meetingId: number, tx: Tx = blindDb): Promise<LetterMeta[]> {
  return tx("recommendation_letters as l").join("signatures_open as s", "s.id", "l.signature_id").where("l.meeting_id", meetingId).select(LETTER_COLUMNS).orderBy("l.version", "desc");
}

export async function fetchLetterPdf(trialId: number, meetingId: number, version: number | null, tx: Tx = blindDb): Promise<(LetterMeta & { pdf: Buffer }) | undefined> {
  const q = tx("recommendation_letters as l").join("signatures_open as s", "s.id", "l.signature_id").where({ "l.trial_id": trialId, "l.meeting_id": meetingId });
  if (version !== null) q.where("l.version", version);
  return q.orderBy("l.version", "desc").first([...LETTER_COLUMNS, "l.pdf"]);
}

export async function fetchLetterById(id: number, tx: Tx = db): Promise<(LetterMeta & { pdf: Buffer }) | undefined> {
  return tx("recommendation_letters as l").join("signatures_open as s", "s.id", "l.signature_id").where("l.id", id).first([...LETTER_COLUMNS, "l.pdf"]);
}

/** Inserts the next letter version of a meeting; call inside a transaction that locks the meeting row. */
export async function insertLetterVersion(tx: Tx, l: { trialId: number; meetingId: number; recommendationId: number; contentHash: string; pdf: Buffer; pageCount: number; signatureId: number; createdBy: number; now: Date }): Promise<{ id: number; version: number }> {
  const last = await tx("recommendation_letters").where({ meeting_id: l.meetingId }).max({ v: "version" }).first();
  const version = Number(last?.v ?? 0) + 1;
  const [id] = await tx("recommendation_letters").insert({
    trial_id: l.trialId,
    meeting_id: l.meetingId,
    recommendation_id: l.recommendationId,
    version,
    content_hash: l.contentHash,
    page_count: l.pageCount,
    byte_size: l.pdf.length,
    pdf: l.pdf,
    signature_id: l.signatureId,
    created_by: l.createdBy,
    created_at: l.now,
  });
  return { id, version };
}

/**
 * The committee's current recommendation made at a meeting, open columns only (decision, look,
 * date, signer): what the letter may say.
 */
export async function fetchMeetingRecommendationOpen(meetingId: number, tx: Tx = blindDb): Promise<{ id: number; decision: string; recordedAt: Date; signerName: string; lookNumber: number; reviewVersion: number } | undefined> {
  return tx("recommendations as r")
    .join("analyses as a", "a.id", "r.analysis_id")
    .join("signatures_open as s", "s.id", "r.signature_id")
    .join("meetings as m", function () {
      this.on("m.analysis_id", "=", "r.analysis_id");
    })
    .where("m.id", meetingId)
    .whereRaw("r.review_version = a.review_version")
    .whereNotExists(tx("recommendations as c").whereRaw("c.corrects_id = r.id"))
    .orderBy("r.id", "desc")
    .first("r.id", "r.decision", "r.created_at as recordedAt", "s.signer_name as signerName", "a.look_number as lookNumber", "r.review_version as reviewVersion");
}
