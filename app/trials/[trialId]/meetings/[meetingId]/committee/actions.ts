"use server";
/**
 * The meeting's committee acts on the open side: attendance per session, declarations, minutes
 * (open ones here; closed ones only for unblinded callers), and the letter to the sponsor. Votes
 * and the committee's recommendation are in ../closed-session/actions.ts.
 */
import { revalidatePath } from "next/cache";
import type { TrialAccess } from "@/lib/auth";
import { approveMinutes, declareConflicts, mayDraftOpenMinutes, recordSessionAttendance, saveMinutesDraft } from "@/lib/committee/service";
import { queueLetterMail, signRecommendationLetter } from "@/lib/committee/letter";
import { committeeAct, formFields } from "@/lib/committee/action-support";
import { deliverAfterResponse } from "@/lib/mail/delivery";
import type { CommitteeFormState } from "@/lib/committee/schemas";

const refresh = (a: TrialAccess, form: FormData) => {
  const m = Number(form.get("meetingId"));
  if (Number.isInteger(m) && m > 0) {
    revalidatePath(`/trials/${a.trial.id}/meetings/${m}/committee`);
    revalidatePath(`/trials/${a.trial.id}/meetings/${m}/closed-session`);
  }
};

export async function recordOpenAttendanceAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "manageMeetings", async (a) => {
    await recordSessionAttendance(a, { ...formFields(form, ["attendedIds"]), session: "open" });
    refresh(a, form);
    return "Attendance of the open session recorded.";
  });
}

export async function recordClosedAttendanceAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "viewClosed", async (a) => {
    await recordSessionAttendance(a, { ...formFields(form, ["attendedIds"]), session: "closed" });
    refresh(a, form);
    return "Attendance of the closed session recorded.";
  });
}

export async function declareConflictsAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "recordRecommendation", async (a) => {
    await declareConflicts(a, formFields(form));
    refresh(a, form);
    return "Your declaration is signed and recorded.";
  });
}

export async function saveOpenMinutesAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(
    form,
    "viewOpen",
    async (a) => {
      const r = await saveMinutesDraft(a, { ...formFields(form), session: "open" });
      refresh(a, form);
      return r.created ? `Open minutes: draft version ${r.version} started.` : `Open minutes: draft version ${r.version} saved.`;
    },
    mayDraftOpenMinutes,
  );
}

export async function saveClosedMinutesAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "viewClosed", async (a) => {
    const r = await saveMinutesDraft(a, { ...formFields(form), session: "closed" });
    refresh(a, form);
    return r.created ? `Closed minutes: draft version ${r.version} started.` : `Closed minutes: draft version ${r.version} saved.`;
  });
}

export async function approveMinutesAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "recordRecommendation", async (a) => {
    const r = await approveMinutes(a, formFields(form));
    refresh(a, form);
    return `Minutes version ${r.version} approved and signed. Approved minutes are never edited; a correction is a new version.`;
  });
}

export async function signLetterAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "recordRecommendation", async (a) => {
    const r = await signRecommendationLetter(a, formFields(form));
    refresh(a, form);
    return r.created ? `Letter version ${r.version} signed.` : `The letter is unchanged: version ${r.version} stands.`;
  });
}

export async function sendLetterAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "recordRecommendation", async (a) => {
    const q = await queueLetterMail(a, formFields(form));
    deliverAfterResponse(q.ids);
    refresh(a, form);
    return `Sending letter version ${q.version} to ${q.recipients} sponsor contact${q.recipients === 1 ? "" : "s"}. Delivery is logged on the meeting page.`;
  });
}
