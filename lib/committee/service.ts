import "server-only";
/**
 * The committee's open acts: who sits on it and who chairs (an administrator's acts), attendance per
 * session, conflict-of-interest declarations, and minutes (drafts, the chair's signed approval,
 * corrections as new versions). Each function takes a TrialAccess the caller obtained with the
 * capability named beside it and re-checks that capability itself before it reads or writes
 * anything (a service is callable from anywhere, so it does not trust its caller), then the
 * committee seat where one is needed; it validates with zod, writes in one transaction with one
 * audit row per act, and throws HttpError/ZodError for anything refused (nothing is written then).
 * Closed-session minutes pass through here only for writing, and only for an unblinded caller; the
 * text of closed minutes goes only into closed audit rows. Votes and the committee's recommendation
 * are closed acts: lib/committee/votes.ts and lib/review/record-recommendation.ts.
 */
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { insertSignature } from "@/db/queries/signatures";
import { fetchMemberships } from "@/db/queries/memberships";
import { fetchMeeting } from "@/db/queries/meetings";
import {
  fetchCommittee,
  fetchDeclarations,
  fetchDraftDesignForUpdate,
  setDraftDesignQuorum,
  fetchLatestMinutesForUpdate,
  insertCommitteeMember,
  insertDeclaration,
  insertMinutesVersion,
  isVoting,
  lockCommittee,
  markMinutesApproved,
  replaceSessionAttendance,
  updateCommitteeRole,
  updateMinutesDraft,
  type CommitteeMember,
} from "@/db/queries/committee";
import type { MeetingRow } from "@/db/types";
import { allows, assertCapability, type TrialAccess } from "@/lib/auth";
import { confirmSigner } from "@/lib/auth/signature";
import { conflict, fieldRefusal, forbiddenError, HttpError, notFoundError } from "@/lib/http";
import { addMemberSchema, changeChairSchema, declarationSchema, minutesApproveSchema, minutesDraftSchema, quorumSchema, sessionAttendanceSchema } from "./schemas";


/** The member row of the caller on this trial's committee, if any. */
async function committeeSeat(access: TrialAccess): Promise<{ committee: CommitteeMember[]; seat: CommitteeMember | undefined }> {
  const committee = await fetchCommittee(access.trial.id);
  return { committee, seat: committee.find((m) => m.userId === access.user.id) };
}

export function requireChair(access: TrialAccess, committee: CommitteeMember[]): CommitteeMember {
  const seat = committee.find((m) => m.userId === access.user.id);
  if (!seat || seat.role !== "chair") throw new HttpError(403, "Only the committee's chair may do this.");
  return seat;
}

export async function meetingOf(access: TrialAccess, meetingId: number): Promise<MeetingRow & { lookNumber: number }> {
  const meeting = await fetchMeeting(access.trial.id, meetingId);
  if (!meeting) throw notFoundError("That meeting");
  if (meeting.status === "cancelled") throw conflict("This meeting was cancelled.");
  return meeting;
}

/** manageCommittee (administrator): puts a DMC member or the unblinded statistician on the committee. */
export async function addCommitteeMember(access: TrialAccess, raw: unknown): Promise<{ id: number }> {
  assertCapability(access, "manageCommittee");
  const input = addMemberSchema.parse(raw);
  const roles = (await fetchMemberships({ trialId: access.trial.id })).filter((m) => m.userId === input.userId).map((m) => m.role);
  if (roles.length === 0) throw fieldRefusal(422, "Only a member of this trial can sit on its committee.", "userId");
  if (input.role === "statistician" ? !roles.includes("unblinded_statistician") : !roles.includes("dmc_member"))
    throw fieldRefusal(422, input.role === "statistician" ? "The committee's statistician must hold the unblinded statistician role on this trial." : "Voting members and the chair must hold the DMC member role on this trial.", "role");
  return writeTransaction(async (tx) => {
    await lockCommittee(tx, access.trial.id);
    const committee = await fetchCommittee(access.trial.id, tx);
    if (committee.some((m) => m.userId === input.userId)) throw fieldRefusal(409, "That person is already on the committee.", "userId");
    if (input.role === "chair" && committee.some((m) => m.role === "chair"))
      throw fieldRefusal(409, "The committee already has a chair. A trial has one chair: change the chair instead.", "role");
    const id = await insertCommitteeMember(tx, { trialId: access.trial.id, userId: input.userId, role: input.role, createdBy: access.user.id });
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "committee_member_added", entityType: "committee_member", entityId: id, visibility: "open", newValues: { userId: input.userId, role: input.role } });
    return { id };
  });
}

/** manageCommittee (administrator): makes a voting member the chair; the former chair stays a voting member. Audited. */
export async function changeCommitteeChair(access: TrialAccess, raw: unknown): Promise<void> {
  assertCapability(access, "manageCommittee");
  const input = changeChairSchema.parse(raw);
  await writeTransaction(async (tx) => {
    await lockCommittee(tx, access.trial.id);
    const committee = await fetchCommittee(access.trial.id, tx);
    const next = committee.find((m) => m.id === input.memberId);
    if (!next) throw fieldRefusal(422, "Choose a member of this committee.", "memberId");
    if (next.role === "chair") throw fieldRefusal(409, "That member already chairs the committee.", "memberId");
    if (next.role !== "voting") throw fieldRefusal(422, "The independent statistician does not vote and cannot chair; choose a voting member.", "memberId");
    const former = committee.find((m) => m.role === "chair");
    // The former chair's row first: the unique index on chair_of_trial_id allows one chair at a time.
    if (former && !(await updateCommitteeRole(tx, former.id, former.rowVersion, access.trial.id, "voting"))) throw conflict("The committee changed since you opened it; nothing was saved. Reload and try again.");
    if (input.rowVersion !== null && input.rowVersion !== next.rowVersion) throw conflict("The committee changed since you opened it; nothing was saved. Reload and try again.");
    if (!(await updateCommitteeRole(tx, next.id, next.rowVersion, access.trial.id, "chair"))) throw conflict("The committee changed since you opened it; nothing was saved. Reload and try again.");
    await appendAudit(tx, {
      actorUserId: access.user.id,
      actorEmail: access.user.email,
      trialId: access.trial.id,
      action: "committee_chair_changed",
      entityType: "committee_member",
      entityId: next.id,
      visibility: "open",
      oldValues: { chairUserId: former?.userId ?? null },
      newValues: { chairUserId: next.userId },
    });
  });
}

/**
 * editDesign (administrator, unblinded statistician): writes the DMC's quorum into the trial's draft
 * design version, so it is signed with the charter when that version is locked. A locked version
 * is never changed: without a draft, start an amendment first.
 */
export async function setCharterQuorum(access: TrialAccess, raw: unknown): Promise<{ designVersion: number }> {
  assertCapability(access, "editDesign");
  const input = quorumSchema.parse(raw);
  return writeTransaction(async (tx) => {
    const draft = await fetchDraftDesignForUpdate(tx, access.trial.id);
    if (!draft) throw conflict("The quorum is part of the charter: it is written in a draft design version. Start an amendment on the Design page, set the quorum, then lock the amendment.");
    await setDraftDesignQuorum(tx, draft.id, input.quorum);
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "design_quorum_set", entityType: "design", entityId: draft.id, visibility: "open", oldValues: { version: draft.version, dmcQuorum: draft.dmcQuorum }, newValues: { version: draft.version, dmcQuorum: input.quorum } });
    return { designVersion: draft.version };
  });
}

/**
 * Attendance of one session. Open session: manageMeetings. Closed session: unblinded callers only
 * (viewClosed: the closed session is theirs), and only committee members
 * and the trial's unblinded statisticians can be recorded as present.
 */
export async function recordSessionAttendance(access: TrialAccess, raw: unknown, now = new Date()): Promise<void> {
  // The session decides the capability, so it is read first (a missing one is a ZodError on `session`).
  const session = sessionAttendanceSchema.pick({ session: true }).parse(raw).session;
  if (session === "open") assertCapability(access, "manageMeetings");
  else if (!access.unblinded) throw forbiddenError("recording the closed session");
  const input = sessionAttendanceSchema.parse(raw);
  const meeting = await meetingOf(access, input.meetingId);
  if (new Date(meeting.scheduled_at).getTime() > now.getTime()) throw conflict("Attendance can be recorded once the meeting has started.");
  const [memberships, committee] = await Promise.all([fetchMemberships({ trialId: access.trial.id }), fetchCommittee(access.trial.id)]);
  const eligible = new Set(
    input.session === "open"
      ? memberships.map((m) => m.userId)
      : [...committee.map((m) => m.userId), ...memberships.filter((m) => m.role === "unblinded_statistician").map((m) => m.userId)],
  );
  if (input.attendedIds.some((id) => !eligible.has(id)))
    throw fieldRefusal(422, input.session === "closed" ? "Only committee members and the unblinded statistician attend the closed session." : "Only members of this trial can be recorded as attending.", "attendedIds");
  const attended = new Set(input.attendedIds);
  await writeTransaction(async (tx) => {
    await tx("meetings").where({ id: meeting.id }).forUpdate().first("id");
    await replaceSessionAttendance(tx, meeting.id, input.session, [...eligible].map((userId) => ({ userId, attended: attended.has(userId) })), access.user.id, now);
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "session_attendance_recorded", entityType: "meeting", entityId: meeting.id, visibility: "open", newValues: { session: input.session, attended: [...attended] } });
  });
}

/** recordRecommendation (a DMC member on the committee's voting list): the signed declaration at the start of a meeting. */
export async function declareConflicts(access: TrialAccess, raw: unknown, now = new Date()): Promise<void> {
  assertCapability(access, "recordRecommendation");
  const input = declarationSchema.parse(raw);
  const meeting = await meetingOf(access, input.meetingId);
  const { seat } = await committeeSeat(access);
  if (!seat || !isVoting(seat)) throw new HttpError(403, "Only the committee's voting members declare conflicts of interest here.");
  if ((await fetchDeclarations(meeting.id)).some((d) => d.userId === access.user.id)) throw conflict("You have already declared for this meeting; a declaration is never edited.");
  await confirmSigner(access.user, input.password);
  const hasConflict = input.hasConflict === "yes";
  const statement = hasConflict ? input.statement : null;
  await writeTransaction(async (tx) => {
    const signature = await insertSignature(tx, {
      userId: access.user.id,
      signerName: access.user.name,
      signerEmail: access.user.email,
      meaning: "conflict of interest declared",
      entityType: "meeting",
      entityId: meeting.id,
      record: { meetingId: meeting.id, userId: access.user.id, hasConflict, statement },
    });
    const id = await insertDeclaration(tx, { meetingId: meeting.id, userId: access.user.id, hasConflict, statement, signatureId: signature.id, now }).catch((e: unknown) => {
      if ((e as { code?: string }).code === "ER_DUP_ENTRY") throw conflict("You have already declared for this meeting; a declaration is never edited.");
      throw e;
    });
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "conflict_declared", entityType: "conflict_declaration", entityId: id, visibility: "open", newValues: { meetingId: meeting.id, hasConflict, statement, signatureId: signature.id } });
  });
}

/** Open-session minutes are drafted by the meeting's organisers (manageMeetings) and by committee members (recordRecommendation). */
export function mayDraftOpenMinutes(access: TrialAccess): void {
  if (!allows(access.principal, "manageMeetings") && !allows(access.principal, "recordRecommendation")) throw forbiddenError("writing the minutes");
}

/**
 * Drafts minutes. Open minutes: manageMeetings or a committee member; closed minutes: unblinded
 * callers only. Edits the latest draft when its row version is given; starts a new version when
 * the latest is approved (a correction) or there is none.
 */
export async function saveMinutesDraft(access: TrialAccess, raw: unknown, now = new Date()): Promise<{ version: number; created: boolean }> {
  const session = minutesDraftSchema.pick({ session: true }).parse(raw).session;
  if (session === "open") mayDraftOpenMinutes(access);
  else if (!access.unblinded) throw forbiddenError("writing the closed minutes");
  const input = minutesDraftSchema.parse(raw);
  const meeting = await meetingOf(access, input.meetingId);
  return writeTransaction(async (tx) => {
    const latest = await fetchLatestMinutesForUpdate(tx, meeting.id, input.session);
    let version: number;
    let created: boolean;
    if (latest && latest.approvalSignatureId === null) {
      if (input.rowVersion !== latest.rowVersion) throw conflict("Someone changed these minutes since you opened them; nothing was saved. Reload and edit again.");
      if (!(await updateMinutesDraft(tx, latest.id, latest.rowVersion, input.body, now))) throw conflict("These minutes changed or were approved meanwhile; nothing was saved. Reload the page.");
      version = latest.version;
      created = false;
    } else {
      if (latest && input.rowVersion !== null) throw conflict("These minutes were approved meanwhile; approved minutes are never edited. Reload to start a correction.");
      version = (latest?.version ?? 0) + 1;
      await insertMinutesVersion(tx, { meetingId: meeting.id, session: input.session, version, body: input.body, createdBy: access.user.id, now });
      created = true;
    }
    await appendAudit(tx, {
      actorUserId: access.user.id,
      actorEmail: access.user.email,
      trialId: access.trial.id,
      action: created ? (latest ? "minutes_correction_started" : "minutes_drafted") : "minutes_draft_edited",
      entityType: "meeting",
      entityId: meeting.id,
      // Closed minutes are closed text: their audit row is closed, and even their versions are not counted for blinded readers.
      visibility: input.session === "closed" ? "closed" : "open",
      newValues: { session: input.session, version, body: input.body },
    });
    return { version, created };
  });
}

/** The chair's signed approval of the latest draft of one session's minutes. Closed minutes: the chair is unblinded by role. */
export async function approveMinutes(access: TrialAccess, raw: unknown, now = new Date()): Promise<{ version: number }> {
  assertCapability(access, "recordRecommendation");
  const input = minutesApproveSchema.parse(raw);
  if (input.session === "closed" && !access.unblinded) throw forbiddenError("approving the closed minutes");
  const meeting = await meetingOf(access, input.meetingId);
  requireChair(access, await fetchCommittee(access.trial.id));
  await confirmSigner(access.user, input.password);
  return writeTransaction(async (tx) => {
    const latest = await fetchLatestMinutesForUpdate(tx, meeting.id, input.session);
    if (!latest) throw conflict("There are no minutes of this session to approve yet.");
    if (latest.approvalSignatureId !== null) throw conflict(`Version ${latest.version} is already approved. Approved minutes are never edited; a correction is a new version.`);
    const signature = await insertSignature(tx, {
      userId: access.user.id,
      signerName: access.user.name,
      signerEmail: access.user.email,
      meaning: "minutes approved",
      entityType: "meeting_minutes",
      entityId: latest.id,
      record: { meetingId: meeting.id, session: input.session, version: latest.version, body: latest.body },
    });
    if (!(await markMinutesApproved(tx, latest.id, latest.rowVersion, signature.id, now))) throw conflict("The minutes changed meanwhile; nothing was signed. Reload the page.");
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "minutes_approved", entityType: "meeting", entityId: meeting.id, visibility: input.session === "closed" ? "closed" : "open", newValues: { session: input.session, version: latest.version, signatureId: signature.id } });
    return { version: latest.version };
  });
}
