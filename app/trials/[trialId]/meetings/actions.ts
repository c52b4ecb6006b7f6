"use server";
/**
 * Meeting actions. Each re-checks the session and the role (manageMeetings) inside: a server
 * action is a public POST endpoint. Mail is recorded in the request and delivered after the
 * response (next/server `after`), so a slow or dead mail server never holds up the page.
 */
import { formId } from "@/lib/route-params";
import { after } from "next/server";
import { revalidatePath } from "next/cache";
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { requireTrialAccess, type TrialAccess } from "@/lib/auth";
import { HttpError, publicErrorMessage } from "@/lib/http";
import { fetchAnalysisOpen } from "@/db/queries/open-status";
import { fetchMemberships } from "@/db/queries/memberships";
import { fetchAttendees, fetchMeeting, insertMeeting, recordAttendance, updateMeetingStatus } from "@/db/queries/meetings";
import { requeueFailedEmail, fetchEmail } from "@/db/queries/emails";
import { zonedWallTimeToUtc } from "@/lib/packets/meeting-time";
import { generateOpenPacket } from "@/lib/packets/open-packet";
import { queueDueReminders, queuePacketMail } from "@/lib/mail/outbox";
import { deliverWithRetries, ensureMailWorker } from "@/lib/mail/delivery";
import { attendanceSchema, emailRefSchema, meetingRefSchema, scheduleFormValues, scheduleMeetingSchema, type MeetingFormState } from "@/lib/meetings/schemas";

async function access(trialIdRaw: FormDataEntryValue | null): Promise<TrialAccess | MeetingFormState> {
  try {
    return await requireTrialAccess(formId(trialIdRaw), "manageMeetings");
  } catch (e) {
    if (e instanceof HttpError) return { error: e.message };
    throw e;
  }
}
const isState = (a: TrialAccess | MeetingFormState): a is MeetingFormState => !("trial" in a);

function deliverLater(ids: number[]): void {
  ensureMailWorker();
  after(async () => {
    try {
      await deliverWithRetries(ids);
    } catch (e) {
      console.error("[cairn] background mail delivery stopped; the retry sweep will pick the messages up", e);
    }
  });
}

export async function scheduleMeeting(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  const a = await access(form.get("trialId"));
  if (isState(a)) return a;
  const parsed = scheduleMeetingSchema.safeParse(scheduleFormValues(form));
  if (!parsed.success) return { error: "Check the highlighted fields.", fieldErrors: parsed.error.flatten().fieldErrors };
  const v = parsed.data;
  const when = zonedWallTimeToUtc(v.scheduledLocal, v.timeZone);
  if (!when.ok) return { error: "Check the highlighted fields.", fieldErrors: { scheduledLocal: [when.error] } };
  if (when.utc.getTime() < Date.now()) return { error: "Check the highlighted fields.", fieldErrors: { scheduledLocal: ["Choose a time in the future."] } };
  const analysis = await fetchAnalysisOpen(v.analysisId);
  if (!analysis || analysis.trial_id !== a.trial.id) return { error: "Check the highlighted fields.", fieldErrors: { analysisId: ["Choose an analysis of this trial."] } };
  const members = new Set((await fetchMemberships({ trialId: a.trial.id })).map((m) => m.userId));
  if (v.attendeeIds.some((id) => !members.has(id))) return { error: "Check the highlighted fields.", fieldErrors: { attendeeIds: ["Attendees must be members of this trial."] } };
  const meetingId = await writeTransaction(async (tx) => {
    const id = await insertMeeting(tx, {
      trialId: a.trial.id,
      analysisId: v.analysisId,
      scheduledAt: when.utc,
      timeZone: v.timeZone,
      openAgenda: v.openAgenda,
      closedAgenda: v.closedAgenda,
      reminderDaysBefore: v.reminderDaysBefore,
      createdBy: a.user.id,
      attendeeUserIds: v.attendeeIds,
    });
    await appendAudit(tx, {
      actorUserId: a.user.id,
      actorEmail: a.user.email,
      trialId: a.trial.id,
      action: "meeting_scheduled",
      entityType: "meeting",
      entityId: id,
      visibility: "open",
      newValues: { lookNumber: analysis.look_number, scheduledAt: when.utc.toISOString(), timeZone: v.timeZone, attendees: v.attendeeIds, reminderDaysBefore: v.reminderDaysBefore, openAgenda: v.openAgenda },
    });
    // Closed text (db/classification.ts) goes only into a closed row, never into the open one above.
    if (v.closedAgenda.trim())
      await appendAudit(tx, {
        actorUserId: a.user.id,
        actorEmail: a.user.email,
        trialId: a.trial.id,
        action: "meeting_closed_agenda_set",
        entityType: "meeting",
        entityId: id,
        visibility: "closed",
        newValues: { closedAgenda: v.closedAgenda },
      });
    return id;
  });
  revalidatePath(`/trials/${a.trial.id}/meetings`);
  return { ok: "Meeting scheduled.", meetingId };
}

/**
 * The open packet only. The closed packet is prepared by the unblinded statistician from the closed
 * review of the look (review/[analysisId]/packet-actions.ts): nothing this module imports reads
 * closed data, so a blinded organiser's request cannot cause a closed read.
 */
export async function generateOpenPacketAction(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  const a = await access(form.get("trialId"));
  if (isState(a)) return a;
  const ref = meetingRefSchema.safeParse({ trialId: form.get("trialId"), meetingId: form.get("meetingId") });
  if (!ref.success) return { error: "That meeting is not valid." };
  try {
    const r = await generateOpenPacket(a.trial, ref.data.meetingId, a.user, new Date());
    revalidatePath(`/trials/${a.trial.id}/meetings/${ref.data.meetingId}`);
    return { ok: `Open report: version ${r.version}${r.created ? " (new)" : " (unchanged)"}.` };
  } catch (e) {
    if (e instanceof HttpError) return { error: publicErrorMessage(e, a.unblinded) };
    throw e;
  }
}

export async function sendPacket(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  const a = await access(form.get("trialId"));
  if (isState(a)) return a;
  const ref = meetingRefSchema.safeParse({ trialId: form.get("trialId"), meetingId: form.get("meetingId") });
  if (!ref.success) return { error: "That meeting is not valid." };
  try {
    const q = await queuePacketMail(a.trial, ref.data.meetingId, a.user);
    deliverLater(q.ids);
    revalidatePath(`/trials/${a.trial.id}/meetings/${ref.data.meetingId}`);
    return { ok: `Sending ${q.ids.length} messages to ${q.recipients} people (open report v${q.openVersion}${q.closedVersion ? `, closed report v${q.closedVersion} by link` : ""}). Delivery status is below.` };
  } catch (e) {
    if (e instanceof HttpError) return { error: e.message };
    throw e;
  }
}

export async function sendDueReminders(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  const a = await access(form.get("trialId"));
  if (isState(a)) return a;
  const ids = await queueDueReminders({ trialId: a.trial.id, actor: a.user });
  if (ids.length) deliverLater(ids);
  revalidatePath(`/trials/${a.trial.id}/meetings`);
  return { ok: ids.length ? `Sending ${ids.length} reminder${ids.length === 1 ? "" : "s"}.` : "No reminders are due: each meeting's reminder goes out once, from its reminder day on." };
}

export async function saveAttendance(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  const a = await access(form.get("trialId"));
  if (isState(a)) return a;
  const parsed = attendanceSchema.safeParse({ trialId: form.get("trialId"), meetingId: form.get("meetingId"), rowVersion: form.get("rowVersion"), attendedIds: form.getAll("attendedIds") });
  if (!parsed.success) return { error: "The attendance form is not valid." };
  const { meetingId, rowVersion, attendedIds } = parsed.data;
  const meeting = await fetchMeeting(a.trial.id, meetingId);
  if (!meeting) return { error: "That meeting was not found." };
  if (meeting.status === "cancelled") return { error: "This meeting was cancelled." };
  if (new Date(meeting.scheduled_at).getTime() > Date.now()) return { error: "Attendance can be recorded once the meeting has started." };
  const invited = new Set((await fetchAttendees(meetingId)).map((x) => x.userId));
  if (attendedIds.some((id) => !invited.has(id))) return { error: "Only invited people can be recorded as attending." };
  const saved = await writeTransaction(async (tx) => {
    const ok = await recordAttendance(tx, meetingId, rowVersion, attendedIds);
    if (!ok) return false;
    await appendAudit(tx, { actorUserId: a.user.id, actorEmail: a.user.email, trialId: a.trial.id, action: "meeting_attendance_recorded", entityType: "meeting", entityId: meetingId, visibility: "open", newValues: { attended: attendedIds, status: "held" } });
    return true;
  });
  if (!saved) return { error: "Someone else changed this meeting since you opened it. Reload the page and record attendance again." };
  revalidatePath(`/trials/${a.trial.id}/meetings/${meetingId}`);
  return { ok: "Attendance recorded; the meeting is marked as held." };
}

export async function cancelMeeting(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  const a = await access(form.get("trialId"));
  if (isState(a)) return a;
  const parsed = attendanceSchema.pick({ trialId: true, meetingId: true, rowVersion: true }).safeParse({ trialId: form.get("trialId"), meetingId: form.get("meetingId"), rowVersion: form.get("rowVersion") });
  if (!parsed.success) return { error: "That meeting is not valid." };
  const meeting = await fetchMeeting(a.trial.id, parsed.data.meetingId);
  if (!meeting) return { error: "That meeting was not found." };
  if (meeting.status !== "scheduled") return { error: "Only a scheduled meeting can be cancelled." };
  const saved = await writeTransaction(async (tx) => {
    if (!(await updateMeetingStatus(tx, meeting.id, parsed.data.rowVersion, "cancelled"))) return false;
    await appendAudit(tx, { actorUserId: a.user.id, actorEmail: a.user.email, trialId: a.trial.id, action: "meeting_cancelled", entityType: "meeting", entityId: meeting.id, visibility: "open", oldValues: { status: meeting.status }, newValues: { status: "cancelled" } });
    return true;
  });
  if (!saved) return { error: "Someone else changed this meeting since you opened it. Reload the page." };
  revalidatePath(`/trials/${a.trial.id}/meetings/${meeting.id}`);
  return { ok: "Meeting cancelled." };
}

export async function retryFailedEmail(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  const a = await access(form.get("trialId"));
  if (isState(a)) return a;
  const parsed = emailRefSchema.safeParse({ trialId: form.get("trialId"), emailId: form.get("emailId") });
  if (!parsed.success) return { error: "That message is not valid." };
  const msg = await fetchEmail(parsed.data.emailId);
  if (!msg || msg.trial_id !== a.trial.id) return { error: "That message was not found." };
  const ok = await writeTransaction(async (tx) => {
    if (!(await requeueFailedEmail(tx, msg.id, new Date()))) return false;
    await appendAudit(tx, { actorUserId: a.user.id, actorEmail: a.user.email, trialId: a.trial.id, action: "email_requeued", entityType: "email_message", entityId: msg.id, visibility: "open", newValues: { to: msg.to_address } });
    return true;
  });
  if (!ok) return { error: "Only a failed message can be sent again." };
  deliverLater([msg.id]);
  if (msg.meeting_id) revalidatePath(`/trials/${a.trial.id}/meetings/${msg.meeting_id}`);
  return { ok: `Sending again to ${msg.to_address}.` };
}
