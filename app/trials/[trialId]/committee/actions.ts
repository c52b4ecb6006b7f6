"use server";
/** The committee's make-up: an administrator's acts (manageCommittee), audited; and the charter's quorum (editDesign, on a draft design version). */
import { revalidatePath } from "next/cache";
import { addCommitteeMember, changeCommitteeChair, setCharterQuorum } from "@/lib/committee/service";
import { committeeAct, formFields } from "@/lib/committee/action-support";
import type { CommitteeFormState } from "@/lib/committee/schemas";

export async function addCommitteeMemberAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "manageCommittee", async (a) => {
    await addCommitteeMember(a, formFields(form));
    revalidatePath(`/trials/${a.trial.id}/committee`);
    return "Added to the committee.";
  });
}

export async function changeCommitteeChairAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "manageCommittee", async (a) => {
    await changeCommitteeChair(a, formFields(form));
    revalidatePath(`/trials/${a.trial.id}/committee`);
    return "The committee has a new chair; the change is in the audit trail.";
  });
}

export async function setCharterQuorumAction(_prev: CommitteeFormState, form: FormData): Promise<CommitteeFormState> {
  return committeeAct(form, "editDesign", async (a) => {
    const r = await setCharterQuorum(a, formFields(form));
    revalidatePath(`/trials/${a.trial.id}/committee`);
    return `Quorum written into draft design version ${r.designVersion}; it becomes the charter's when that version is locked.`;
  });
}
