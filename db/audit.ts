import "server-only";
import { createHash } from "node:crypto";
import type { Knex } from "knex";
import { db } from "./knex";
import type { AuditEventRow, AuditVisibility } from "./types";

export const GENESIS_HASH = "0".repeat(64);

export type AuditInput = {
  actorUserId: number | null;
  actorEmail: string | null;
  trialId: number | null;
  action: string;
  entityType: string;
  entityId: string | number | null;
  /** "closed" when old or new values hold arm-level or outcome data; blinded roles never see those rows. */
  visibility: AuditVisibility;
  oldValues?: unknown;
  newValues?: unknown;
  reason?: string | null;
};

/** The canonical text a row's hash covers: every field but id and hash, in a fixed order. */
export function auditHashInput(row: Omit<AuditEventRow, "id" | "hash">): string {
  const occurred = row.occurred_at instanceof Date ? row.occurred_at.toISOString() : String(row.occurred_at);
  return JSON.stringify([
    occurred,
    row.actor_user_id,
    row.actor_email,
    row.trial_id,
    row.action,
    row.entity_type,
    row.entity_id,
    row.visibility,
    row.old_values,
    row.new_values,
    row.reason,
    row.prev_hash,
  ]);
}

export function sha256(text: string): string {
  return createHash("sha256").update(text).digest("hex");
}

/**
 * Appends one audit row inside the caller's transaction, chained to the previous row. The chain
 * head row is locked FOR UPDATE, so concurrent appends queue instead of forking the chain.
 */
export async function appendAudit(tx: Knex.Transaction, e: AuditInput): Promise<number> {
  let head = await tx("audit_chain_head").where({ id: 1 }).forUpdate().first();
  if (!head) {
    await tx.raw("INSERT IGNORE INTO audit_chain_head (id, last_event_id, last_hash) VALUES (1, 0, ?)", [GENESIS_HASH]);
    head = await tx("audit_chain_head").where({ id: 1 }).forUpdate().first();
  }
  const row: Omit<AuditEventRow, "id" | "hash"> = {
    occurred_at: new Date(),
    actor_user_id: e.actorUserId,
    actor_email: e.actorEmail,
    trial_id: e.trialId,
    action: e.action,
    entity_type: e.entityType,
    entity_id: e.entityId === null ? null : String(e.entityId),
    visibility: e.visibility,
    old_values: e.oldValues === undefined ? null : JSON.stringify(e.oldValues),
    new_values: e.newValues === undefined ? null : JSON.stringify(e.newValues),
    reason: e.reason ?? null,
    prev_hash: head.last_hash as string,
  };
  const hash = sha256(auditHashInput(row));
  const [id] = await tx("audit_events").insert({ ...row, hash });
  await tx("audit_chain_head").where({ id: 1 }).update({ last_event_id: id, last_hash: hash });
  return id;
}

/** Appends an audit row in a transaction of its own (for events with no other write, e.g. sign-in). */
export async function recordAuditEvent(e: AuditInput): Promise<number> {
  return db.transaction((tx) => appendAudit(tx, e));
}

export type ChainCheck = { ok: true; checked: number } | { ok: false; checked: number; brokenAtId: number; problem: string };

/** Walks the chain in id order and recomputes every hash. */
export async function verifyAuditChain(knex: Knex = db): Promise<ChainCheck> {
  let prev = GENESIS_HASH;
  let checked = 0;
  let lastId = 0;
  for (;;) {
    const rows: AuditEventRow[] = await knex("audit_events").where("id", ">", lastId).orderBy("id").limit(1000);
    if (rows.length === 0) break;
    for (const r of rows) {
      if (r.prev_hash !== prev) return { ok: false, checked, brokenAtId: Number(r.id), problem: "previous-hash link does not match" };
      if (sha256(auditHashInput(r)) !== r.hash) return { ok: false, checked, brokenAtId: Number(r.id), problem: "row content does not match its hash" };
      prev = r.hash;
      lastId = Number(r.id);
      checked++;
    }
  }
  const head = await knex("audit_chain_head").where({ id: 1 }).first();
  if (head && head.last_hash !== prev) return { ok: false, checked, brokenAtId: lastId, problem: "the last row is not the chain head (rows removed at the end?)" };
  return { ok: true, checked };
}

export type AuditFilter = { trialId?: number; openOnly: boolean; limit?: number };

/** Audit rows for a trial; blinded viewers pass openOnly so closed rows are never selected. */
export async function fetchAuditEvents(f: AuditFilter): Promise<AuditEventRow[]> {
  const q = db("audit_events").orderBy("id", "desc").limit(f.limit ?? 2000);
  if (f.trialId !== undefined) q.where("trial_id", f.trialId);
  if (f.openOnly) q.where("visibility", "open");
  return q;
}
