import "server-only";
/**
 * CLOSED acts of the committee: a voting member's signed vote, and the checks the chair's
 * recording of the committee's recommendation must pass (quorum of the closed session, no vote
 * from a conflicted member). Callers hold recordRecommendation (DMC members, unblinded).
 */
import type { Knex } from "knex";
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { insertSignature } from "@/db/queries/signatures";
import { fetchCharterQuorum, fetchCommittee, fetchDeclarations, fetchSessionAttendance, isVoting, quorumInForce, type CommitteeMember } from "@/db/queries/committee";
import { fetchVotes, insertVote, tallyVotes, type CommitteeVote, type Tally } from "@/db/queries/committee-closed";
import { fetchAnalysisOpen } from "@/db/queries/open-status";
import { assertCapability, type TrialAccess } from "@/lib/auth";
import { confirmSigner } from "@/lib/auth/signature";
import { conflict, HttpError } from "@/lib/http";
import { meetingOf } from "./service";
import { voteSchema } from "./schemas";

/** A voting member's signed vote on the look a meeting reviews, with an optional closed comment. */
export async function castVote(access: TrialAccess, raw: unknown, now = new Date()): Promise<{ id: number }> {
  assertCapability(access, "recordRecommendation");
  const input = voteSchema.parse(raw);
  const meeting = await meetingOf(access, input.meetingId);
  const committee = await fetchCommittee(access.trial.id);
  const seat = committee.find((m) => m.userId === access.user.id);
  if (!seat) throw new HttpError(403, "Only the committee's voting members vote.");
  if (!isVoting(seat)) throw new HttpError(403, "The independent statistician attends the committee but does not vote.");
  const analysis = await fetchAnalysisOpen(meeting.analysis_id);
  if (!analysis || (analysis.status !== "locked" && analysis.status !== "reviewed")) throw conflict("The look of this meeting is not locked yet, so there is nothing to vote on.");
  const declaration = (await fetchDeclarations(meeting.id)).find((d) => d.userId === access.user.id);
  if (!declaration) throw conflict("Declare your conflicts of interest for this meeting before voting.");
  if (declaration.hasConflict) throw new HttpError(403, "You declared a conflict of interest for this meeting, so you do not vote on this look.");
  await confirmSigner(access.user, input.password);
  const comment = input.comment === "" ? null : input.comment;
  return writeTransaction(async (tx) => {
    const signature = await insertSignature(tx, {
      userId: access.user.id,
      signerName: access.user.name,
      signerEmail: access.user.email,
      meaning: "vote cast",
      entityType: "meeting",
      entityId: meeting.id,
      record: { meetingId: meeting.id, analysisId: meeting.analysis_id, reviewVersion: analysis.review_version, decision: input.decision, comment },
    });
    const id = await insertVote(tx, { meetingId: meeting.id, analysisId: meeting.analysis_id, userId: access.user.id, decision: input.decision, comment, signatureId: signature.id, now }).catch((e: unknown) => {
      if ((e as { code?: string }).code === "ER_DUP_ENTRY") throw conflict("You have already voted at this meeting; a vote is never edited.");
      throw e;
    });
    // A vote and even the fact that one more vote exists are closed: the audit row is closed.
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "committee_vote_cast", entityType: "committee_vote", entityId: id, visibility: "closed", newValues: { meetingId: meeting.id, decision: input.decision, comment, signatureId: signature.id } });
    return { id };
  });
}

export type Quorum = { required: number; charterQuorum: number | null; designVersion: number | null; votingPresent: number; votingMembers: number; quorate: boolean };

/** Whether the closed session of a meeting was quorate: voting members recorded present against the charter's quorum. */
async function closedSessionQuorum(meetingId: number, analysisId: number, committee: CommitteeMember[]): Promise<Quorum> {
  const [charter, attendance] = await Promise.all([fetchCharterQuorum(analysisId), fetchSessionAttendance(meetingId)]);
  const voting = committee.filter(isVoting);
  const present = new Set(attendance.filter((a) => a.session === "closed" && a.attended).map((a) => a.userId));
  const votingPresent = voting.filter((m) => present.has(m.userId)).length;
  const required = quorumInForce(charter?.quorum ?? null, voting.length);
  return { required, charterQuorum: charter?.quorum ?? null, designVersion: charter?.designVersion ?? null, votingPresent, votingMembers: voting.length, quorate: votingPresent >= required };
}

/**
 * The checks before the chair records the committee's recommendation made at `meetingId`, run
 * inside the recording transaction: the meeting reviews this look, the closed session was
 * quorate, no voter declared a conflict, and at least one vote was cast. Returns the tally.
 */
export async function committeeDecisionFacts(tx: Knex.Transaction, access: TrialAccess, committee: CommitteeMember[], meetingId: number, analysisId: number): Promise<{ tally: Tally; votes: CommitteeVote[]; quorum: Quorum }> {
  const meeting = await meetingOf(access, meetingId);
  if (meeting.analysis_id !== analysisId) throw new HttpError(422, "That meeting does not review this look.", { field: "meetingId" });
  const quorum = await closedSessionQuorum(meeting.id, analysisId, committee);
  if (!quorum.quorate)
    throw conflict(`The closed session was not quorate: ${quorum.votingPresent} voting member${quorum.votingPresent === 1 ? "" : "s"} present, ${quorum.required} required${quorum.charterQuorum === null ? " (a majority: the charter version sets no quorum)" : ` by the charter (design version ${quorum.designVersion})`}. Nothing was recorded.`);
  const votes = await fetchVotes(meeting.id, tx);
  const conflicted = new Set((await fetchDeclarations(meeting.id)).filter((d) => d.hasConflict).map((d) => d.userId));
  if (votes.some((v) => conflicted.has(v.userId))) throw conflict("A voter has declared a conflict of interest for this meeting; the committee's recommendation cannot be recorded on those votes. Nothing was recorded.");
  if (votes.length === 0) throw conflict("No member has voted at this meeting yet. Nothing was recorded.");
  return { tally: tallyVotes(votes), votes, quorum };
}
