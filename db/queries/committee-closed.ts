import "server-only";
/**
 * CLOSED: the committee's votes and their comments, the tally and dissent of a committee
 * recommendation, and the closed-session minutes. Every read takes a ClosedReader with no default
 * (an unblinded TrialAccess's `closed`, or a service's write transaction). No module that a
 * blinded role's page or route imports may import this one (lib/review/blinding-static.test.ts).
 */
import type { ClosedReader, Tx } from "../knex";
import type { RecommendationDecision } from "../types";
import { toMinutes, type MinutesVersion } from "./committee";

export type CommitteeVote = { id: number; userId: number; name: string; decision: RecommendationDecision; comment: string | null; signatureId: number; signedAt: Date };

export async function fetchVotes(meetingId: number, tx: ClosedReader): Promise<CommitteeVote[]> {
  return tx("committee_votes as v")
    .join("users as u", "u.id", "v.user_id")
    .join("signatures as s", "s.id", "v.signature_id")
    .where("v.meeting_id", meetingId)
    .select("v.id", "v.user_id as userId", "u.name", "v.decision", "v.comment", "v.signature_id as signatureId", "s.signed_at as signedAt")
    .orderBy("u.name");
}

export async function insertVote(tx: Tx, v: { meetingId: number; analysisId: number; userId: number; decision: RecommendationDecision; comment: string | null; signatureId: number; now: Date }): Promise<number> {
  const [id] = await tx("committee_votes").insert({ meeting_id: v.meetingId, analysis_id: v.analysisId, user_id: v.userId, decision: v.decision, comment: v.comment, signature_id: v.signatureId, created_at: v.now });
  return id;
}

/** The tally of a meeting's votes: how many voted for each decision. */
export type Tally = Partial<Record<RecommendationDecision, number>>;

export function tallyVotes(votes: ReadonlyArray<{ decision: RecommendationDecision }>): Tally {
  const t: Tally = {};
  for (const v of votes) t[v.decision] = (t[v.decision] ?? 0) + 1;
  return t;
}

type CommitteeRecommendationClosed = { id: number; decision: RecommendationDecision; tally: Tally | null; dissent: string | null; rationale: string; signerName: string; recordedAt: Date; superseded: boolean; correctedById: number | null };

export async function fetchMeetingRecommendationsClosed(meetingId: number, tx: ClosedReader): Promise<CommitteeRecommendationClosed[]> {
  const rows = await tx("recommendations as r")
    .join("analyses as a", "a.id", "r.analysis_id")
    .join("signatures as s", "s.id", "r.signature_id")
    .leftJoin("recommendations as c", "c.corrects_id", "r.id")
    .where("r.meeting_id", meetingId)
    .select("r.id", "r.decision", "r.tally_json as tallyJson", "r.dissent", "r.rationale", "s.signer_name as signerName", "r.created_at as recordedAt", "c.id as correctedById", tx.raw("(r.review_version < a.review_version) as superseded"))
    .orderBy("r.id", "desc");
  return rows.map((r: Omit<CommitteeRecommendationClosed, "tally" | "superseded"> & { tallyJson: string | null; superseded: number | boolean }) => {
    const { tallyJson, ...rest } = r;
    return { ...rest, tally: tallyJson ? (JSON.parse(tallyJson) as Tally) : null, superseded: Boolean(r.superseded) };
  });
}

/** Closed-session minutes, every version, newest first. */
export async function fetchClosedMinutes(meetingId: number, tx: ClosedReader): Promise<MinutesVersion[]> {
  const rows = await tx("meeting_minutes as m")
    .leftJoin("signatures as s", "s.id", "m.approval_signature_id")
    .where({ "m.meeting_id": meetingId, "m.session": "closed" })
    .select("m.id", "m.meeting_id as meetingId", "m.session", "m.version", "m.body", "m.approved_at as approvedAt", "m.row_version as rowVersion", "m.created_at as createdAt", "m.updated_at as updatedAt", "s.signer_name as approvedBy")
    .orderBy("m.version", "desc");
  return rows.map(toMinutes);
}
