"use server";
/**
 * Prepares a meeting's closed packet. Only the unblinded statistician may (viewClosed and
 * manageMeetings, both checked here: a server action is a public POST endpoint), and only from the
 * closed review, which blinded roles cannot open. Closed data are read through the access's own
 * closed connection, so a blinded request has nothing to read them with.
 */
import { formId } from "@/lib/route-params";
import { formError } from "@/lib/form-action";
import { revalidatePath } from "next/cache";
import { closedConnection, requireTrialAccess } from "@/lib/auth";
import { HttpError, publicErrorMessage } from "@/lib/http";
import { StatsDomainError } from "@/lib/stats/validate";
import { fetchMeeting } from "@/db/queries/meetings";
import { prepareClosedPacket } from "@/lib/packets/closed-packet";
import type { MeetingFormState } from "@/lib/meetings/schemas";
import { closedPacketRefSchema } from "./packet-schemas";


export async function prepareClosedPacketAction(_prev: MeetingFormState, form: FormData): Promise<MeetingFormState> {
  let access;
  try {
    const trialId = formId(form.get("trialId"));
    access = await requireTrialAccess(trialId, "viewClosed");
    await requireTrialAccess(trialId, "manageMeetings");
  } catch (e) {
    return formError(e);
  }
  const ref = closedPacketRefSchema.safeParse({ trialId: form.get("trialId"), analysisId: form.get("analysisId"), meetingId: form.get("meetingId") });
  if (!ref.success) return { error: "That meeting is not valid." };
  const meeting = await fetchMeeting(access.trial.id, ref.data.meetingId);
  if (!meeting || meeting.analysis_id !== ref.data.analysisId) return { error: "That meeting was not found for this look." };
  if (meeting.status === "cancelled") return { error: "This meeting was cancelled." };
  try {
    const r = await prepareClosedPacket(access.trial, meeting.id, access.user, closedConnection(access), new Date());
    revalidatePath(`/trials/${access.trial.id}/review/${ref.data.analysisId}`);
    revalidatePath(`/trials/${access.trial.id}/meetings/${meeting.id}`);
    if ("skipped" in r) return { error: `Closed report not made: ${r.skipped}.` };
    return { ok: `Closed report: version ${r.version}${r.created ? " (new)" : " (unchanged)"}. Send it from the meeting page: DMC members get a link, never the content.` };
  } catch (e) {
    if (e instanceof HttpError || e instanceof StatsDomainError) return { error: publicErrorMessage(e, access.unblinded) };
    return formError(e);
  }
}
