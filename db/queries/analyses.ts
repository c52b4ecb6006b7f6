import "server-only";
import { db, type Tx } from "../knex";
import type { AnalysisOpenRow, AnalysisStatus } from "../types";
import { ANALYSIS_OPEN_COLUMNS } from "./open-status";

/** A look that an amendment moved to the newly locked design (recorded in the design_locked audit row). */
type MovedLook = { analysisId: number; lookNumber: number; status: AnalysisStatus; fromDesignId: number; toDesignId: number; fromPlannedN: number; plannedN: number };

/**
 * Creates one planned analysis per look of a newly locked design. Looks already locked or reviewed
 * stay on the design they were locked under. Looks not yet locked follow the new design: those
 * without data are replaced by the new schedule, and those already holding counts are moved to it
 * (design and, when their planned size is not in the new schedule, the next free planned size).
 * Returns the moved looks.
 */
export async function createPlannedLooks(tx: Tx, trialId: number, designId: number, lookSizes: number[]): Promise<MovedLook[]> {
  const existing: AnalysisOpenRow[] = await tx("analyses").where({ trial_id: trialId }).select(ANALYSIS_OPEN_COLUMNS);
  const done = existing.filter((a) => a.status === "locked" || a.status === "reviewed");
  const doneMax = Math.max(0, ...done.map((d) => d.planned_n));
  await tx("analyses")
    .where({ trial_id: trialId })
    .whereIn("status", ["planned", "open"])
    .whereNotExists(tx("analysis_arm_counts").whereRaw("analysis_arm_counts.analysis_id = analyses.id"))
    .delete();
  const withData: AnalysisOpenRow[] = await tx("analyses").where({ trial_id: trialId }).whereIn("status", ["planned", "open"]).orderBy("look_number").select(ANALYSIS_OPEN_COLUMNS);
  const available = lookSizes.filter((n) => n > doneMax);
  const taken = new Set<number>();
  const moved: MovedLook[] = [];
  for (const a of withData) {
    let plannedN = a.planned_n;
    if (!available.includes(plannedN) || taken.has(plannedN)) plannedN = available.find((n) => !taken.has(n) && !withData.some((o) => o !== a && o.planned_n === n)) ?? a.planned_n;
    taken.add(plannedN);
    if (a.design_id === designId && plannedN === a.planned_n) continue;
    await tx("analyses")
      .where({ id: a.id })
      .update({ design_id: designId, planned_n: plannedN, row_version: tx.raw("row_version + 1"), updated_at: new Date() });
    moved.push({ analysisId: a.id, lookNumber: a.look_number, status: a.status, fromDesignId: a.design_id, toDesignId: designId, fromPlannedN: a.planned_n, plannedN });
  }
  const kept = await tx("analyses").where({ trial_id: trialId }).select("look_number", "planned_n");
  const keptSizes = new Set(kept.map((k: { planned_n: number }) => k.planned_n));
  let next = Math.max(0, ...kept.map((k: { look_number: number }) => k.look_number)) + 1;
  const fresh = lookSizes.filter((n) => !keptSizes.has(n) && n > doneMax);
  if (fresh.length)
    await tx("analyses").insert(fresh.map((n) => ({ trial_id: trialId, design_id: designId, look_number: next++, planned_n: n, status: "planned" })));
  return moved;
}

export async function fetchAnalysesOpen(trialId: number, tx: Tx = db): Promise<AnalysisOpenRow[]> {
  return tx("analyses").where({ trial_id: trialId }).select(ANALYSIS_OPEN_COLUMNS).orderBy("look_number");
}

/**
 * Optimistic concurrency: the update applies only if row_version is still the one the editor
 * loaded. Returns false when someone else saved first.
 */
export async function updateAnalysisOpenFields(
  tx: Tx,
  analysisId: number,
  rowVersion: number,
  fields: Partial<{ cutoff_date: string | null; enrolled_total: number | null; status: AnalysisStatus; locked_at: Date | null; reviewed_at: Date | null; lock_signature_id: number | null; amendment_count: number; review_version: number; design_id: number; planned_n: number }>,
): Promise<boolean> {
  const n = await tx("analyses")
    .where({ id: analysisId, row_version: rowVersion })
    .update({ ...fields, row_version: rowVersion + 1, updated_at: new Date() });
  return n === 1;
}

export type AnalysisLockedRow = AnalysisOpenRow & { lock_signature_id: number | null };

/**
 * Reads a look inside a write transaction and holds its row lock until commit, so two saves of the
 * same look queue here and the second sees the first's row_version.
 */
export async function fetchAnalysisForUpdate(tx: Tx, analysisId: number): Promise<AnalysisLockedRow | undefined> {
  return tx("analyses")
    .where({ id: analysisId })
    .forUpdate()
    .first([...ANALYSIS_OPEN_COLUMNS, "lock_signature_id"]);
}

/** The latest cut-off before this look and the earliest after it (open information). */
export async function fetchNeighbourCutoffs(trialId: number, lookNumber: number, tx: Tx = db): Promise<{ before: string | null; after: string | null }> {
  const before = await tx("analyses").where({ trial_id: trialId }).where("look_number", "<", lookNumber).whereNotNull("cutoff_date").max({ d: "cutoff_date" }).first();
  const after = await tx("analyses").where({ trial_id: trialId }).where("look_number", ">", lookNumber).whereNotNull("cutoff_date").min({ d: "cutoff_date" }).first();
  return { before: (before?.d as string | null) ?? null, after: (after?.d as string | null) ?? null };
}

type LockSignatureInfo = { signerName: string; signedAt: Date; meaning: string };

/** The e-signature that locked a look (open information: who signed, when, meaning). */
export async function fetchLockSignature(analysisId: number, tx: Tx = db): Promise<LockSignatureInfo | undefined> {
  return tx("analyses as a")
    .join("signatures as s", "s.id", "a.lock_signature_id")
    .where("a.id", analysisId)
    .first("s.signer_name as signerName", "s.signed_at as signedAt", "s.meaning");
}
