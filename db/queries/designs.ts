import "server-only";
import { db, type Tx } from "../knex";
import type { DesignRow } from "../types";
import { parseDesign } from "@/lib/stats/design-schema";
import type { Design } from "@/lib/stats/types";

export type DesignRecord = Omit<DesignRow, "spec"> & { spec: Design };

/** A design as stored (JSON text), checked against the design schema again on the way out. */
export function parseStoredDesign(spec: string): Design {
  return parseDesign(JSON.parse(spec));
}

function toRecord(r: DesignRow): DesignRecord {
  return { ...r, spec: parseStoredDesign(r.spec) };
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

/** A design version with the open facts of its signature (who signed, meaning, when, record hash). */
export type DesignVersionListing = DesignRecord & {
  signer_name: string | null;
  signature_meaning: string | null;
  signed_at: Date | null;
  record_hash: string | null;
  created_by_name: string | null;
};

/** Every version of a trial's design, newest first; earlier versions stay readable. */
export async function fetchDesignVersions(trialId: number, tx: Tx = db): Promise<DesignVersionListing[]> {
  const rows = await tx("designs as d")
    .leftJoin("signatures as s", "s.id", "d.signature_id")
    .leftJoin("users as u", "u.id", "d.created_by")
    .where("d.trial_id", trialId)
    .orderBy("d.version", "desc")
    .select(
      "d.*",
      "s.signer_name as signer_name",
      "s.meaning as signature_meaning",
      "s.signed_at as signed_at",
      "s.record_hash as record_hash",
      "u.name as created_by_name",
    );
  return rows.map((r: DesignRow & Omit<DesignVersionListing, keyof DesignRecord>) => ({ ...toRecord(r), signer_name: r.signer_name, signature_meaning: r.signature_meaning, signed_at: r.signed_at, record_hash: r.record_hash, created_by_name: r.created_by_name }));
}

/** Reads a design row and locks it until the transaction ends, so lock and save cannot interleave. */
export async function fetchDesignForUpdate(tx: Tx, designId: number): Promise<DesignRecord | undefined> {
  const r = await tx<DesignRow>("designs").where({ id: designId }).forUpdate().first();
  return r ? toRecord(r) : undefined;
}

/** Status of every version of a trial, locked for the transaction (serialises draft creation and amendments). */
export async function fetchDesignStatusesForUpdate(tx: Tx, trialId: number): Promise<Pick<DesignRow, "id" | "version" | "status">[]> {
  return tx<DesignRow>("designs").where({ trial_id: trialId }).forUpdate().select("id", "version", "status").orderBy("version");
}

/** Ids and versions of the locked designs a new charter version will supersede. */
export async function fetchLockedDesignIds(tx: Tx, trialId: number): Promise<{ id: number; version: number }[]> {
  return tx("designs").where({ trial_id: trialId, status: "locked" }).select("id", "version");
}
