"use server";
/** CLOSED acts of the committee: a member's signed vote, and the chair's recording of the committee's recommendation. */
import { revalidatePath } from "next/cache";
import { castVote } from "@/lib/committee/votes";
import { meetingOf } from "@/lib/committee/service";
import { recordRecommendation } from "@/lib/review/record-recommendation";
import { committeeAct, formFields } from "@/lib/committee/action-support";
import { recommendationSchema } from "@/lib/review/recommendation-schema";
import type { CommitteeFormState } from "@/lib/committee/schemas";
import { HttpError } from "@/lib/http";

export async function castVoteAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "recordRecommendation", async (a) => {
    await castVote(a, formFields(form));
    revalidatePath(`/trials/${a.trial.id}/meetings/${Number(form.get("meetingId"))}/closed-session`);
    return "Your vote is signed and recorded.";
  });
}

export async function recordCommitteeRecommendationAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "recordRecommendation", async (a) => {
    const fields = formFields(form);
    // Validate first, so an empty form is refused before the meeting is looked up.
    const input = recommendationSchema.parse(fields);
    if (input.meetingId === null) throw new HttpError(422, "Choose the meeting at which the committee decided.", { field: "meetingId" });
    const meeting = await meetingOf(a, input.meetingId);
    await recordRecommendation(a, meeting.analysis_id, fields);
    revalidatePath(`/trials/${a.trial.id}/meetings/${meeting.id}/closed-session`);
    revalidatePath(`/trials/${a.trial.id}`);
    return "The committee's recommendation is signed and recorded. The open status shows the decision only.";
  });
}
