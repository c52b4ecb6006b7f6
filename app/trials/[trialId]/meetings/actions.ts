"use server";
/**
 * Meeting actions. Each re-checks the session and the role (manageMeetings) inside: a server
 * action is a public POST endpoint. Mail is recorded in the request and delivered after the
 * response (next/server `after`), so a slow or dead mail server never holds up the page.
 */
import { formId } from "@/lib/route-params";
import { revalidatePath } from "next/cache";
import { requireTrialAccess, type TrialAccess } from "@/lib/auth";
import { HttpError } from "@/lib/http";
import { formAction } from "@/lib/form-action";
import * as meetings from "@/lib/meetings/service";
import { generateOpenPacket } from "@/lib/packets/open-packet";
import { queueDueReminders, queuePacketMail } from "@/lib/mail/outbox";
import { deliverAfterResponse } from "@/lib/mail/delivery";
import { meetingRefSchema, scheduleFormValues, type MeetingFormState } from "@/lib/meetings/schemas";

/**
 * Every meeting action: the access check for the trial named in the form, then the act; whatever
 * either throws (a refusal, a field refused, the database down) becomes the form's state through
 * the one mapping (lib/form-action.ts), never the error page.
 */
function meetingAct(form: FormData, act: (access: TrialAccess) => Promise<MeetingFormState>): Promise<MeetingFormState> {
  return formAction(async () => act(await requireTrialAccess(formId(form.get("trialId")), "manageMeetings")), { fieldsBeside: true })();
}

/** The meeting named by the form's hidden fields. */
function meetingRef(form: FormData): number {
  const ref = meetingRefSchema.safeParse({ trialId: form.get("trialId"), meetingId: form.get("meetingId") });
  if (!ref.success) throw new HttpError(422, "That meeting is not valid.");
  return ref.data.meetingId;
}

export async function scheduleMeeting(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  return meetingAct(form, async (a) => {
    const { meetingId } = await meetings.scheduleMeeting(a, scheduleFormValues(form));
    revalidatePath(`/trials/${a.trial.id}/meetings`);
    return { ok: "Meeting scheduled.", meetingId };
  });
}

/**
 * The open packet only. The closed packet is prepared by the unblinded statistician from the closed
 * review of the look (review/[analysisId]/packet-actions.ts): nothing this module imports reads
 * closed data, so a blinded organiser's request cannot cause a closed read.
 */
export async function generateOpenPacketAction(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  return meetingAct(form, async (a) => {
    const meetingId = meetingRef(form);
    const r = await generateOpenPacket(a.trial, meetingId, a.user, new Date());
    revalidatePath(`/trials/${a.trial.id}/meetings/${meetingId}`);
    return { ok: `Open report: version ${r.version}${r.created ? " (new)" : " (unchanged)"}.` };
  });
}

export async function sendPacket(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  return meetingAct(form, async (a) => {
    const meetingId = meetingRef(form);
    const q = await queuePacketMail(a.trial, meetingId, a.user);
    deliverAfterResponse(q.ids);
    revalidatePath(`/trials/${a.trial.id}/meetings/${meetingId}`);
    return { ok: `Sending ${q.ids.length} messages to ${q.recipients} people (open report v${q.openVersion}${q.closedVersion ? `, closed report v${q.closedVersion} by link` : ""}). Delivery status is below.` };
  });
}

export async function sendDueReminders(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  return meetingAct(form, async (a) => {
    const ids = await queueDueReminders({ trialId: a.trial.id, actor: a.user });
    if (ids.length) deliverAfterResponse(ids);
    revalidatePath(`/trials/${a.trial.id}/meetings`);
    return { ok: ids.length ? `Sending ${ids.length} reminder${ids.length === 1 ? "" : "s"}.` : "No reminders are due: each meeting's reminder goes out once, from its reminder day on." };
  });
}

export async function saveAttendance(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  return meetingAct(form, async (a) => {
    const { meetingId } = await meetings.recordMeetingAttendance(a, { meetingId: form.get("meetingId"), rowVersion: form.get("rowVersion"), attendedIds: form.getAll("attendedIds") });
    revalidatePath(`/trials/${a.trial.id}/meetings/${meetingId}`);
    return { ok: "Attendance recorded; the meeting is marked as held." };
  });
}

export async function cancelMeeting(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  return meetingAct(form, async (a) => {
    const { meetingId } = await meetings.cancelMeeting(a, { meetingId: form.get("meetingId"), rowVersion: form.get("rowVersion") });
    revalidatePath(`/trials/${a.trial.id}/meetings/${meetingId}`);
    return { ok: "Meeting cancelled." };
  });
}

export async function retryFailedEmail(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  return meetingAct(form, async (a) => {
    const r = await meetings.retryFailedEmail(a, { emailId: form.get("emailId") });
    deliverAfterResponse([r.emailId]);
    if (r.meetingId) revalidatePath(`/trials/${a.trial.id}/meetings/${r.meetingId}`);
    return { ok: `Sending again to ${r.toAddress}.` };
  });
}
