import "server-only";
import { db, type Tx } from "../knex";
import type { DesignRow } from "../types";
import { parseDesign } from "@/lib/stats/design-schema";
import type { Design } from "@/lib/stats/types";

export type DesignRecord = Omit<DesignRow, "spec"> & { spec: Design };

function toRecord(r: DesignRow): DesignRecord {
  return { ...r, spec: parseDesign(JSON.parse(r.spec)) };
}

export async function fetchDesigns(trialId: number, tx: Tx = db): Promise<DesignRecord[]> {
  const rows = await tx<DesignRow>("designs").where({ trial_id: trialId }).orderBy("version", "desc");
  return rows.map(toRecord);
}

export async function fetchDesign(designId: number, tx: Tx = db): Promise<DesignRecord | undefined> {
  const r = await tx<DesignRow>("designs").where({ id: designId }).first();
  return r ? toRecord(r) : undefined;
}

/** The locked (charter) design of a trial, if any. */
export async function fetchLockedDesign(trialId: number, tx: Tx = db): Promise<DesignRecord | undefined> {
  const r = await tx<DesignRow>("designs").where({ trial_id: trialId, status: "locked" }).orderBy("version", "desc").first();
  return r ? toRecord(r) : undefined;
}

export async function insertDesignVersion(
  tx: Tx,
  d: { trialId: number; spec: Design; createdBy: number | null; amendmentReason: string | null },
): Promise<{ id: number; version: number }> {
  const last = await tx("designs").where({ trial_id: d.trialId }).max({ v: "version" }).first();
  const version = Number(last?.v ?? 0) + 1;
  const [id] = await tx("designs").insert({
    trial_id: d.trialId,
    version,
    status: "draft",
    spec: JSON.stringify(d.spec),
    amendment_reason: d.amendmentReason,
    created_by: d.createdBy,
  });
  return { id, version };
}

/** Updates a draft's spec if nobody saved it since `rowVersion`; returns false on a stale version. */
export async function updateDraftSpec(tx: Tx, designId: number, rowVersion: number, spec: Design): Promise<boolean> {
  const n = await tx("designs")
    .where({ id: designId, row_version: rowVersion, status: "draft" })
    .update({ spec: JSON.stringify(spec), row_version: rowVersion + 1 });
  return n === 1;
}

export async function markDesignLocked(tx: Tx, designId: number, signatureId: number): Promise<void> {
  await tx("designs").where({ id: designId }).update({ status: "locked", signature_id: signatureId, locked_at: new Date() });
}

export async function supersedeLockedDesigns(tx: Tx, trialId: number): Promise<void> {
  await tx("designs").where({ trial_id: trialId, status: "locked" }).update({ status: "superseded" });
}
