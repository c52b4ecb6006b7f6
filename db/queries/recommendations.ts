import "server-only";
/**
 * CLOSED where marked: the DMC's recommendations. The decision and date are open (blinded roles
 * read them through fetchRecommendationsOpen in db/queries/open-status.ts); the rationale is
 * closed and is selected only here, by callers that have passed viewClosed or
 * recordRecommendation. Rows are never updated or deleted: a correction is a new row whose
 * corrects_id names the row it corrects.
 */
import { db, type Tx } from "../knex";
import type { RecommendationDecision } from "../types";

export { RECOMMENDATION_DECISIONS } from "@/lib/domain";

/** CLOSED: a recommendation with its rationale and signature. */
type RecommendationClosed = {
  id: number;
  trialId: number;
  analysisId: number;
  lookNumber: number;
  decision: RecommendationDecision;
  rationale: string;
  correctsId: number | null;
  /** Id of the later entry that corrects this one, if any. */
  correctedById: number | null;
  /** The review version of the look the recommendation was made on. */
  reviewVersion: number;
  /** True when the look has been reopened after this recommendation (a later review version is in force). */
  superseded: boolean;
  recordedAt: Date;
  signatureId: number;
  signerName: string;
  signerEmail: string;
  signatureMeaning: string;
  signedAt: Date;
  recordHash: string;
};

function closedQuery(tx: Tx) {
  return tx("recommendations as r")
    .join("analyses as a", "a.id", "r.analysis_id")
    .join("signatures as s", "s.id", "r.signature_id")
    .leftJoin("recommendations as c", "c.corrects_id", "r.id")
    .select(
      "r.id",
      "r.trial_id as trialId",
      "r.analysis_id as analysisId",
      "a.look_number as lookNumber",
      "r.decision",
      "r.rationale",
      "r.corrects_id as correctsId",
      "c.id as correctedById",
      "r.created_at as recordedAt",
      "r.signature_id as signatureId",
      "s.signer_name as signerName",
      "s.signer_email as signerEmail",
      "s.meaning as signatureMeaning",
      "s.signed_at as signedAt",
      "s.record_hash as recordHash",
      "r.review_version as reviewVersion",
      tx.raw("(r.review_version < a.review_version) as superseded"),
    );
}

const withFlag = <T extends { superseded: unknown }>(r: T) => ({ ...r, superseded: Boolean(r.superseded) });

/** CLOSED: every recommendation of a trial (optionally one analysis), newest first. */
export async function fetchRecommendationsClosed(trialId: number, analysisId?: number, tx: Tx = db): Promise<RecommendationClosed[]> {
  const q = closedQuery(tx).where("r.trial_id", trialId).orderBy("r.id", "desc");
  if (analysisId !== undefined) q.where("r.analysis_id", analysisId);
  return (await q).map(withFlag);
}

/**
 * Ids of the recommendations of an analysis, made on its review version in force, that no later
 * entry corrects (normally at most one). Recommendations of an earlier review version are superseded.
 */
export async function fetchCurrentRecommendationIds(tx: Tx, analysisId: number, reviewVersion: number): Promise<number[]> {
  const rows: { id: number }[] = await tx("recommendations as r")
    .where("r.analysis_id", analysisId)
    .where("r.review_version", reviewVersion)
    .whereNotExists(tx("recommendations as c").whereRaw("c.corrects_id = r.id"))
    .select("r.id");
  return rows.map((r) => r.id);
}

type NewRecommendation = {
  trialId: number;
  analysisId: number;
  decision: RecommendationDecision;
  rationale: string;
  correctsId: number | null;
  signatureId: number;
  createdBy: number;
  createdAt: Date;
  reviewVersion: number;
  /** A committee's recommendation: the meeting, the tally of the votes, the dissent (closed). */
  meetingId?: number | null;
  tally?: unknown;
  dissent?: string | null;
};

export async function insertRecommendation(tx: Tx, r: NewRecommendation): Promise<number> {
  const [id] = await tx("recommendations").insert({
    trial_id: r.trialId,
    analysis_id: r.analysisId,
    decision: r.decision,
    rationale: r.rationale,
    corrects_id: r.correctsId,
    signature_id: r.signatureId,
    created_by: r.createdBy,
    created_at: r.createdAt,
    review_version: r.reviewVersion,
    meeting_id: r.meetingId ?? null,
    tally_json: r.tally === undefined || r.tally === null ? null : JSON.stringify(r.tally),
    dissent: r.dissent ?? null,
  });
  return id;
}

/** CLOSED: a signature's id and the hash of the record it signed (the hash of a look's counts is closed: few possible values). */
type SignatureProvenance = { signatureId: number; recordHash: string; signerName: string; meaning: string; signedAt: Date };

/** CLOSED: the signature that locked a look in its current version, and the one that locked its design. */
export async function fetchReviewSignatures(analysisId: number, tx: Tx = db): Promise<{ lock: SignatureProvenance | null; design: SignatureProvenance | null }> {
  const cols = (alias: string) => [`${alias}.id as signatureId`, `${alias}.record_hash as recordHash`, `${alias}.signer_name as signerName`, `${alias}.meaning`, `${alias}.signed_at as signedAt`];
  const lock = await tx("analyses as a").join("signatures as s", "s.id", "a.lock_signature_id").where("a.id", analysisId).first(cols("s"));
  const design = await tx("analyses as a").join("designs as d", "d.id", "a.design_id").join("signatures as s", "s.id", "d.signature_id").where("a.id", analysisId).first(cols("s"));
  return { lock: lock ?? null, design: design ?? null };
}
