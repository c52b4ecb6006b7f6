import type { ArmCounts } from "@/lib/domain";
import "server-only";
/**
 * CLOSED data: arm-level counts, patient-level outcomes, rationales, the closed-session agenda.
 * Every read takes a ClosedReader and has no default: the branded connection comes only from an
 * unblinded TrialAccess (lib/auth closedConnection), or a write transaction of a service that
 * checked enterData. The blinding tests check that no module reachable from a blinded route
 * imports this one.
 */
import type { ClosedReader, Tx } from "../knex";
import type { ArmCountRow, PatientOutcomeRow } from "../types";

export async function fetchArmCounts(analysisId: number, tx: ClosedReader): Promise<ArmCountRow[]> {
  return tx<ArmCountRow>("analysis_arm_counts").where({ analysis_id: analysisId }).orderBy("arm_id");
}

export async function fetchArmCountsForTrial(trialId: number, tx: ClosedReader): Promise<(ArmCountRow & { look_number: number })[]> {
  return tx("analysis_arm_counts as c")
    .join("analyses as a", "a.id", "c.analysis_id")
    .where("a.trial_id", trialId)
    .select("c.*", "a.look_number")
    .orderBy(["a.look_number", "c.arm_id"]);
}

/** One arm's stored counts at one look with the look's status and design: what a single posterior needs, in one round trip. */
type ArmAtLookRow = {
  status: string;
  look_number: number;
  cutoff_date: Date | string | null;
  spec: string;
  arm_id: number | null;
  arm_label: string | null;
  arm_role: "single" | "experimental" | "control" | null;
  enrolled: number | null;
  treated: number | null;
  evaluable: number | null;
  responders: number | null;
  toxicities: number | null;
};

export async function fetchArmAtLook(trialId: number, analysisId: number, armId: number, tx: ClosedReader): Promise<ArmAtLookRow | undefined> {
  return tx("analyses as a")
    .join("designs as d", "d.id", "a.design_id")
    .leftJoin("arms as r", (j) => j.onVal("r.id", "=", armId).andOn("r.trial_id", "=", "a.trial_id"))
    .leftJoin("analysis_arm_counts as c", (j) => j.on("c.analysis_id", "=", "a.id").andOn("c.arm_id", "=", "r.id"))
    .where({ "a.id": analysisId, "a.trial_id": trialId })
    .first(["a.status", "a.look_number", "a.cutoff_date", "d.spec", "r.id as arm_id", "r.label as arm_label", "r.arm_role", "c.enrolled", "c.treated", "c.evaluable", "c.responders", "c.toxicities"]);
}

export type ArmCountsInput = ArmCounts;

/** The one conversion from a stored counts row to the domain record. */
export function armCountsOf(row: Pick<ArmCountRow, "arm_id" | "enrolled" | "treated" | "evaluable" | "responders" | "toxicities"> & { pending?: number | null }): ArmCounts {
  return { armId: row.arm_id, enrolled: row.enrolled, treated: row.treated, evaluable: row.evaluable, responders: row.responders, toxicities: row.toxicities, pending: row.pending ?? 0 };
}

/** Replaces the counts of an analysis (all arms at once). */
export async function replaceArmCounts(tx: Tx, analysisId: number, counts: ArmCountsInput[]): Promise<void> {
  await tx("analysis_arm_counts").where({ analysis_id: analysisId }).delete();
  if (counts.length)
    await tx("analysis_arm_counts").insert(
      counts.map((c) => ({
        analysis_id: analysisId,
        arm_id: c.armId,
        enrolled: c.enrolled,
        treated: c.treated,
        evaluable: c.evaluable,
        pending: c.pending ?? 0,
        responders: c.responders,
        toxicities: c.toxicities,
      })),
    );
}

type PatientOutcomeInput = Omit<PatientOutcomeRow, "id" | "analysis_id">;

export async function replacePatientOutcomes(tx: Tx, analysisId: number, rows: PatientOutcomeInput[]): Promise<void> {
  await tx("patient_outcomes").where({ analysis_id: analysisId }).delete();
  for (let i = 0; i < rows.length; i += 500) {
    await tx("patient_outcomes").insert(rows.slice(i, i + 500).map((r) => ({ ...r, analysis_id: analysisId })));
  }
}

/** CLOSED: patient rows of a look with their arm label, for the data grid. */
export type PatientOutcomeGridRow = PatientOutcomeRow & { arm_label: string };

export async function fetchPatientOutcomeGrid(analysisId: number, tx: ClosedReader): Promise<PatientOutcomeGridRow[]> {
  return tx("patient_outcomes as p")
    .join("arms as a", "a.id", "p.arm_id")
    .where("p.analysis_id", analysisId)
    .select("p.*", "a.label as arm_label")
    .orderBy("p.source_line");
}

/** Removes a look's patient rows (the switch to count-level entry); returns how many there were. */
export async function deletePatientOutcomes(tx: Tx, analysisId: number): Promise<number> {
  return tx("patient_outcomes").where({ analysis_id: analysisId }).delete();
}

/**
 * The counts of the nearest locked (or reviewed) look before and after a look, for the rule that
 * cumulative counts never fall from one look to the next.
 */
type LockedNeighbour = { lookNumber: number; counts: ArmCountRow[] } | null;
export async function fetchNeighbourLockedCounts(trialId: number, lookNumber: number, tx: ClosedReader): Promise<{ before: LockedNeighbour; after: LockedNeighbour }> {
  const locked = ["locked", "reviewed"];
  const [prev, next] = await Promise.all([
    tx("analyses").where({ trial_id: trialId }).whereIn("status", locked).where("look_number", "<", lookNumber).orderBy("look_number", "desc").first("id", "look_number"),
    tx("analyses").where({ trial_id: trialId }).whereIn("status", locked).where("look_number", ">", lookNumber).orderBy("look_number", "asc").first("id", "look_number"),
  ]);
  const load = async (a: { id: number; look_number: number } | undefined) => (a ? { lookNumber: a.look_number, counts: await fetchArmCounts(a.id, tx) } : null);
  return { before: await load(prev), after: await load(next) };
}

export async function countPatientOutcomes(analysisId: number, tx: ClosedReader): Promise<number> {
  const r = await tx("patient_outcomes").where({ analysis_id: analysisId }).count({ n: "*" }).first();
  return Number(r?.n ?? 0);
}

/** CLOSED: a meeting's closed-session agenda (typed by the organiser, read only by unblinded roles). */
export async function fetchClosedAgenda(meetingId: number, tx: ClosedReader): Promise<string> {
  const r = await tx("meetings").where({ id: meetingId }).first("closed_agenda");
  return (r?.closed_agenda as string | undefined) ?? "";
}

/**
 * The kept closed review of a locked look (review_cache): read and written only here, with a closed
 * reader, like every other arm-level result. A row is served only for the exact key; a different
 * input hash (corrected data) or engine version misses it.
 */
export type ReviewCacheKey = { analysisId: number; reviewVersion: number; engineVersion: string; inputSha256: string };

export async function fetchCachedReviewJson(key: ReviewCacheKey, tx: ClosedReader): Promise<string | null> {
  const row = await tx("review_cache")
    .where({ analysis_id: key.analysisId, review_version: key.reviewVersion, engine_version: key.engineVersion, input_sha256: key.inputSha256 })
    .first("review_json");
  return row ? (row.review_json as string) : null;
}

/** Stores a computed review; a row already there for the key (a concurrent first read) is kept. */
export async function storeCachedReviewJson(key: ReviewCacheKey, reviewJson: string, tx: ClosedReader): Promise<void> {
  await tx("review_cache")
    .insert({ analysis_id: key.analysisId, review_version: key.reviewVersion, engine_version: key.engineVersion, input_sha256: key.inputSha256, review_json: reviewJson, created_at: new Date() })
    .onConflict(["analysis_id", "review_version", "engine_version", "input_sha256"])
    .ignore();
}

/** Drops a look's kept reviews (when it is reopened for a correction, they describe data being replaced). */
export async function deleteCachedReviews(analysisId: number, tx: Tx): Promise<void> {
  await tx("review_cache").where({ analysis_id: analysisId }).delete();
}
