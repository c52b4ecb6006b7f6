import "server-only";
/**
 * Open information only. Nothing in this module may select from analysis_arm_counts,
 * patient_outcomes or recommendation rationales; the blinding tests grep for that. Reads default
 * to the blinded account (blindDb), which MariaDB refuses closed data, for every caller: what is
 * open is the same for every role.
 */
import { blindDb as db, type Tx } from "../knex";
import type { AnalysisOpenRow, RecommendationDecision } from "../types";

export const ANALYSIS_OPEN_COLUMNS = [
  "id",
  "trial_id",
  "design_id",
  "look_number",
  "planned_n",
  "cutoff_date",
  "enrolled_total",
  "status",
  "amendment_count",
  "row_version",
  "locked_at",
  "reviewed_at",
  "review_version",
] as const;

export async function fetchLookSchedule(trialId: number, tx: Tx = db): Promise<AnalysisOpenRow[]> {
  return tx("analyses").where({ trial_id: trialId }).select(ANALYSIS_OPEN_COLUMNS).orderBy("look_number");
}

export async function fetchAnalysisOpen(analysisId: number, tx: Tx = db): Promise<AnalysisOpenRow | undefined> {
  return tx("analyses").where({ id: analysisId }).first(ANALYSIS_OPEN_COLUMNS);
}

type OpenRecommendation = {
  id: number;
  analysisId: number;
  lookNumber: number;
  decision: RecommendationDecision;
  correctsId: number | null;
  recordedAt: Date;
  signerName: string;
  /** The review version of the look the recommendation was made on. */
  reviewVersion: number;
  /** True when the look was reopened for a correction after this recommendation (its review version is past). */
  superseded: boolean;
};

/** Recommendations without their rationale: decision, date, who signed, which look. */
export async function fetchRecommendationsOpen(trialId: number, tx: Tx = db): Promise<OpenRecommendation[]> {
  return tx("recommendations as r")
    .join("analyses as a", "a.id", "r.analysis_id")
    .join("signatures_open as s", "s.id", "r.signature_id")
    .where("r.trial_id", trialId)
    .select(
      "r.id",
      "r.analysis_id as analysisId",
      "a.look_number as lookNumber",
      "r.decision",
      "r.corrects_id as correctsId",
      "r.created_at as recordedAt",
      "s.signer_name as signerName",
      "r.review_version as reviewVersion",
      tx.raw("(r.review_version < a.review_version) as superseded"),
    )
    .orderBy("r.id", "desc")
    .then((rows: Array<OpenRecommendation & { superseded: number | boolean }>) => rows.map((r) => ({ ...r, superseded: Boolean(r.superseded) })));
}

type DesignMeta = { id: number; version: number; status: string; lockedAt: Date | null; amendmentReason: string | null };

export async function fetchDesignVersions(trialId: number, tx: Tx = db): Promise<DesignMeta[]> {
  return tx("designs")
    .where({ trial_id: trialId })
    .select("id", "version", "status", "locked_at as lockedAt", "amendment_reason as amendmentReason")
    .orderBy("version", "desc");
}

/** The committee's letter to the sponsor, latest version per meeting (open: no data, no votes). */
type OpenLetter = { id: number; meetingId: number; lookNumber: number; version: number; contentHash: string; signerName: string; createdAt: Date };

export async function fetchLatestLettersOfTrial(trialId: number, tx: Tx = db): Promise<OpenLetter[]> {
  return tx("recommendation_letters as l")
    .join("signatures_open as s", "s.id", "l.signature_id")
    .join("meetings as m", "m.id", "l.meeting_id")
    .join("analyses as a", "a.id", "m.analysis_id")
    .where("l.trial_id", trialId)
    .whereNotExists(tx("recommendation_letters as n").whereRaw("n.meeting_id = l.meeting_id AND n.version > l.version"))
    .select("l.id", "l.meeting_id as meetingId", "a.look_number as lookNumber", "l.version", "l.content_hash as contentHash", "s.signer_name as signerName", "l.created_at as createdAt")
    .orderBy("l.id", "desc");
}
