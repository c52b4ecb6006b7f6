import "server-only";
/**
 * The meetings' open acts: schedule a DMC meeting, record who attended (the meeting is then held),
 * cancel a scheduled meeting, and send a failed message again. Each function takes the caller's
 * TrialAccess, re-checks manageMeetings itself (a service is callable from anywhere, so it does not
 * trust that its caller checked), validates with lib/meetings/schemas.ts, writes in one transaction
 * with its audit row(s), and throws HttpError (a refused field names it in `details.field`) or
 * ZodError for anything refused: nothing is written then. A stale row version is a 409.
 *
 * The closed-session agenda is closed text (db/classification.ts): it is stored with the meeting and
 * goes only into a closed audit row, never into the open one.
 *
 * Mail delivery and page revalidation are the server actions' (app/trials/[trialId]/meetings/actions.ts);
 * the packets and reminders are lib/packets/open-packet.ts and lib/mail/outbox.ts.
 */
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { fetchAnalysisOpen } from "@/db/queries/open-status";
import { fetchMemberships } from "@/db/queries/memberships";
import { fetchAttendees, fetchMeeting, insertMeeting, recordAttendance, updateMeetingStatus } from "@/db/queries/meetings";
import { fetchEmail, requeueFailedEmail } from "@/db/queries/emails";
import { assertCapability, type TrialAccess } from "@/lib/auth";
import { conflict, fieldRefusal, HttpError, notFoundError } from "@/lib/http";
import { zonedWallTimeToUtc } from "@/lib/packets/meeting-time";
import { attendanceSchema, emailRefSchema, scheduleMeetingSchema } from "./schemas";

const field = (message: string, f: string) => fieldRefusal(422, message, f);

// The forms carry the trial's id for the access check; the service acts on access.trial only.
const attendanceInput = attendanceSchema.omit({ trialId: true });
const cancelInput = attendanceSchema.pick({ meetingId: true, rowVersion: true });
const emailInput = emailRefSchema.omit({ trialId: true });

/** Schedules a meeting for a look of this trial, with its invited members. */
export async function scheduleMeeting(access: TrialAccess, raw: unknown, now = new Date()): Promise<{ meetingId: number }> {
  assertCapability(access, "manageMeetings");
  const v = scheduleMeetingSchema.parse(raw);
  const when = zonedWallTimeToUtc(v.scheduledLocal, v.timeZone);
  if (!when.ok) throw field(when.error, "scheduledLocal");
  if (when.utc.getTime() < now.getTime()) throw field("Choose a time in the future.", "scheduledLocal");
  const analysis = await fetchAnalysisOpen(v.analysisId);
  if (!analysis || analysis.trial_id !== access.trial.id) throw field("Choose an analysis of this trial.", "analysisId");
  const members = new Set((await fetchMemberships({ trialId: access.trial.id })).map((m) => m.userId));
  if (v.attendeeIds.some((id) => !members.has(id))) throw field("Attendees must be members of this trial.", "attendeeIds");
  const actor = { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, entityType: "meeting" } as const;
  const meetingId = await writeTransaction(async (tx) => {
    const id = await insertMeeting(tx, {
      trialId: access.trial.id,
      analysisId: v.analysisId,
      scheduledAt: when.utc,
      timeZone: v.timeZone,
      openAgenda: v.openAgenda,
      closedAgenda: v.closedAgenda,
      reminderDaysBefore: v.reminderDaysBefore,
      createdBy: access.user.id,
      attendeeUserIds: v.attendeeIds,
    });
    await appendAudit(tx, {
      ...actor,
      action: "meeting_scheduled",
      entityId: id,
      visibility: "open",
      newValues: { lookNumber: analysis.look_number, scheduledAt: when.utc.toISOString(), timeZone: v.timeZone, attendees: v.attendeeIds, reminderDaysBefore: v.reminderDaysBefore, openAgenda: v.openAgenda },
    });
    // Closed text goes only into a closed row, never into the open one above.
    if (v.closedAgenda.trim()) await appendAudit(tx, { ...actor, action: "meeting_closed_agenda_set", entityId: id, visibility: "closed", newValues: { closedAgenda: v.closedAgenda } });
    return id;
  });
  return { meetingId };
}

/** Records who of the invited attended a meeting that has started; the meeting is then held. */
export async function recordMeetingAttendance(access: TrialAccess, raw: unknown, now = new Date()): Promise<{ meetingId: number }> {
  assertCapability(access, "manageMeetings");
  const parsed = attendanceInput.safeParse(raw);
  if (!parsed.success) throw new HttpError(422, "The attendance form is not valid.");
  const { meetingId, rowVersion, attendedIds } = parsed.data;
  const meeting = await fetchMeeting(access.trial.id, meetingId);
  if (!meeting) throw notFoundError("That meeting");
  if (meeting.status === "cancelled") throw conflict("This meeting was cancelled.");
  if (new Date(meeting.scheduled_at).getTime() > now.getTime()) throw conflict("Attendance can be recorded once the meeting has started.");
  const invited = new Set((await fetchAttendees(meetingId)).map((x) => x.userId));
  if (attendedIds.some((id) => !invited.has(id))) throw new HttpError(422, "Only invited people can be recorded as attending.");
  await writeTransaction(async (tx) => {
    if (!(await recordAttendance(tx, meetingId, rowVersion, attendedIds))) throw conflict("Someone else changed this meeting since you opened it. Reload the page and record attendance again.");
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "meeting_attendance_recorded", entityType: "meeting", entityId: meetingId, visibility: "open", newValues: { attended: attendedIds, status: "held" } });
  });
  return { meetingId };
}

/** Cancels a scheduled meeting (never deleted: it stays listed as cancelled). */
export async function cancelMeeting(access: TrialAccess, raw: unknown): Promise<{ meetingId: number }> {
  assertCapability(access, "manageMeetings");
  const parsed = cancelInput.safeParse(raw);
  if (!parsed.success) throw new HttpError(422, "That meeting is not valid.");
  const meeting = await fetchMeeting(access.trial.id, parsed.data.meetingId);
  if (!meeting) throw notFoundError("That meeting");
  if (meeting.status !== "scheduled") throw conflict("Only a scheduled meeting can be cancelled.");
  await writeTransaction(async (tx) => {
    if (!(await updateMeetingStatus(tx, meeting.id, parsed.data.rowVersion, "cancelled"))) throw conflict("Someone else changed this meeting since you opened it. Reload the page.");
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "meeting_cancelled", entityType: "meeting", entityId: meeting.id, visibility: "open", oldValues: { status: meeting.status }, newValues: { status: "cancelled" } });
  });
  return { meetingId: meeting.id };
}

/** Queues a failed message of this trial for delivery again; the caller starts the delivery. */
export async function retryFailedEmail(access: TrialAccess, raw: unknown, now = new Date()): Promise<{ emailId: number; meetingId: number | null; toAddress: string }> {
  assertCapability(access, "manageMeetings");
  const parsed = emailInput.safeParse(raw);
  if (!parsed.success) throw new HttpError(422, "That message is not valid.");
  const msg = await fetchEmail(parsed.data.emailId);
  if (!msg || msg.trial_id !== access.trial.id) throw notFoundError("That message");
  await writeTransaction(async (tx) => {
    if (!(await requeueFailedEmail(tx, msg.id, now))) throw conflict("Only a failed message can be sent again.");
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "email_requeued", entityType: "email_message", entityId: msg.id, visibility: "open", newValues: { to: msg.to_address } });
  });
  return { emailId: msg.id, meetingId: msg.meeting_id, toAddress: msg.to_address };
}
