import "server-only";
/**
 * Records the DMC's recommendation for a locked analysis with an electronic signature, in one
 * transaction: signature, recommendation row, analysis marked reviewed, one audit row. Shared by
 * the server actions and the route handler; it takes their TrialAccess and re-checks
 * recordRecommendation itself before it reads or writes anything.
 */
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { insertSignature } from "@/db/queries/signatures";
import { updateAnalysisOpenFields } from "@/db/queries/analyses";
import { fetchCurrentRecommendationIds, insertRecommendation } from "@/db/queries/recommendations";
import { fetchAnalysisForUpdate } from "@/db/queries/analyses";
import { assertCapability, type TrialAccess } from "@/lib/auth";
import { confirmSigner } from "@/lib/auth/signature";
import { conflict, HttpError, notFoundError } from "@/lib/http";
import { recommendationSchema } from "./recommendation-schema";
import { fetchCommittee } from "@/db/queries/committee";
import { committeeDecisionFacts } from "@/lib/committee/votes";

type RecordedRecommendation = { id: number; analysisId: number; decision: string; correctsId: number | null; signatureId: number; recordedAt: string };

/**
 * @throws HttpError 403 without recordRecommendation; ZodError for invalid input (422), HttpError 422 for a wrong password, 404 when the
 *   analysis is not this trial's, 409 when the analysis is not locked, when a first recommendation
 *   already exists (record a correction instead), or when the corrected entry is not the current one.
 *   When the trial has a committee: 403 unless the caller chairs it, 422 without the meeting, 409
 *   when that meeting's closed session was not quorate, a voter declared a conflict, or nobody voted.
 */
export async function recordRecommendation(access: TrialAccess, analysisId: number, raw: unknown): Promise<RecordedRecommendation> {
  assertCapability(access, "recordRecommendation");
  const input = recommendationSchema.parse(raw);
  // With a committee the recommendation is the committee's: only its chair records it, at a meeting.
  const committee = await fetchCommittee(access.trial.id);
  if (committee.length > 0) {
    if (committee.find((m) => m.userId === access.user.id)?.role !== "chair")
      throw new HttpError(403, "This trial has a committee: only its chair records the committee's recommendation, after the members have voted.");
    if (input.meetingId === null) throw new HttpError(422, "Choose the meeting at which the committee decided.", { field: "meetingId" });
  }
  await confirmSigner(access.user, input.password);
  const now = new Date();
  return writeTransaction(async (tx) => {
    const analysis = await fetchAnalysisForUpdate(tx, analysisId);
    if (!analysis || analysis.trial_id !== access.trial.id) throw notFoundError("That analysis");
    if (analysis.status !== "locked" && analysis.status !== "reviewed")
      throw conflict("Only a locked analysis can be reviewed: this look has not been locked yet.");
    const current = await fetchCurrentRecommendationIds(tx, analysisId, analysis.review_version);
    if (input.correctsId === null && current.length > 0)
      throw conflict("A recommendation is already recorded for this look. Recorded recommendations are never edited: record a correction instead.");
    if (input.correctsId !== null && !current.includes(input.correctsId))
      throw new HttpError(409, "Only the current recommendation of this look can be corrected; it may have been corrected already. Reload the page.", { field: "correctsId" });
    const facts = committee.length > 0 && input.meetingId !== null ? await committeeDecisionFacts(tx, access, committee, input.meetingId, analysisId) : null;
    const committeeRecord = facts ? { meetingId: input.meetingId, tally: facts.tally, dissent: input.dissent } : {};
    const record = { analysisId, reviewVersion: analysis.review_version, decision: input.decision, rationale: input.rationale, correctsId: input.correctsId, ...committeeRecord };
    const signature = await insertSignature(tx, {
      userId: access.user.id,
      signerName: access.user.name,
      signerEmail: access.user.email,
      meaning: "recommendation recorded",
      entityType: "analysis",
      entityId: analysisId,
      record,
    });
    const id = await insertRecommendation(tx, { trialId: access.trial.id, analysisId, decision: input.decision, rationale: input.rationale, correctsId: input.correctsId, signatureId: signature.id, createdBy: access.user.id, createdAt: now, reviewVersion: analysis.review_version, ...(facts ? { meetingId: input.meetingId, tally: facts.tally, dissent: input.dissent } : {}) });
    if (analysis.status === "locked") {
      const ok = await updateAnalysisOpenFields(tx, analysisId, analysis.row_version, { status: "reviewed", reviewed_at: now });
      if (!ok) throw conflict("The analysis changed while the recommendation was being recorded; nothing was saved. Reload and try again.");
    }
    // The rationale, tally and dissent are closed, so they stay out of the audit row; the signature's hash covers them.
    await appendAudit(tx, {
      actorUserId: access.user.id,
      actorEmail: access.user.email,
      trialId: access.trial.id,
      action: input.correctsId === null ? "recommendation_recorded" : "recommendation_corrected",
      entityType: "recommendation",
      entityId: id,
      visibility: "open",
      newValues: { analysisId, lookNumber: analysis.look_number, reviewVersion: analysis.review_version, decision: input.decision, correctsId: input.correctsId, signatureId: signature.id, ...(facts ? { meetingId: input.meetingId, byCommittee: true } : {}) },
    });
    return { id, analysisId, decision: input.decision, correctsId: input.correctsId, signatureId: signature.id, recordedAt: now.toISOString() };
  });
}
