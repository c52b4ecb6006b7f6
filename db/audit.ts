import "server-only";
import type { Knex } from "knex";
import { blindDb, db } from "./knex";
import { CURRENT_HASH_SCHEME, hashByScheme, sha256Hex } from "./keyed-hash";
import type { AuditEventOpenRow, AuditEventRow, AuditVisibility } from "./types";

export const GENESIS_HASH = "0".repeat(64);

type AuditInput = {
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

/**
 * The canonical text a row's hash covers: every field but id and hash, in a fixed order. Keyed
 * rows also cover their scheme, so a row cannot be relabelled as a legacy (unkeyed) one.
 */
function auditHashInput(row: Omit<AuditEventRow, "id" | "hash">): string {
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
    ...(row.hash_scheme === "sha256" || row.hash_scheme === undefined ? [] : [row.hash_scheme]),
  ]);
}

/** Plain SHA-256; kept for rows written before keyed hashing (hash_scheme "sha256"). */
export const sha256 = sha256Hex;

/** The hash a row should carry, by the scheme it names. */
export function auditRowHash(row: Omit<AuditEventRow, "id" | "hash">, key?: string): string {
  return hashByScheme(row.hash_scheme ?? "sha256", "audit-row", auditHashInput(row), key);
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
    hash_scheme: CURRENT_HASH_SCHEME,
  };
  const hash = auditRowHash(row);
  const [id] = await tx("audit_events").insert({ ...row, hash });
  await tx("audit_chain_head").where({ id: 1 }).update({ last_event_id: id, last_hash: hash });
  return id;
}

/** Appends an audit row in a transaction of its own (for events with no other write, e.g. sign-in). */
export async function recordAuditEvent(e: AuditInput): Promise<number> {
  return db.transaction((tx) => appendAudit(tx, e));
}

type ChainCheck = { ok: true; checked: number } | { ok: false; checked: number; brokenAtId: number; problem: string };

/**
 * Walks the chain in id order and recomputes every hash (keyed rows need CAIRN_AUDIT_KEY). The
 * scheme may only move forward: once a keyed row appears, an unkeyed row after it is a break,
 * so nobody without the key can append or rewrite rows by labelling them "sha256".
 */
export async function verifyAuditChain(knex: Knex = db, key?: string): Promise<ChainCheck> {
  let prev = GENESIS_HASH;
  let keyedSeen = false;
  let checked = 0;
  let lastId = 0;
  for (;;) {
    const rows: AuditEventRow[] = await knex("audit_events").where("id", ">", lastId).orderBy("id").limit(1000);
    if (rows.length === 0) break;
    for (const r of rows) {
      if (r.prev_hash !== prev) return { ok: false, checked, brokenAtId: Number(r.id), problem: "previous-hash link does not match" };
      if (r.hash_scheme === "sha256" && keyedSeen) return { ok: false, checked, brokenAtId: Number(r.id), problem: "an unkeyed row after keyed rows (written without the key?)" };
      if (r.hash_scheme !== "sha256" && r.hash_scheme !== CURRENT_HASH_SCHEME) return { ok: false, checked, brokenAtId: Number(r.id), problem: `unknown hash scheme "${r.hash_scheme}"` };
      if (r.hash_scheme === CURRENT_HASH_SCHEME) keyedSeen = true;
      if (auditRowHash(r, key) !== r.hash) return { ok: false, checked, brokenAtId: Number(r.id), problem: "row content does not match its hash" };
      prev = r.hash;
      lastId = Number(r.id);
      checked++;
    }
  }
  const head = await knex("audit_chain_head").where({ id: 1 }).first();
  if (head && head.last_hash !== prev) return { ok: false, checked, brokenAtId: lastId, problem: "the last row is not the chain head (rows removed at the end?)" };
  return { ok: true, checked };
}

type AuditFilter = { trialId?: number; openOnly: boolean; limit?: number };

/** The columns a blinded viewer's audit query selects: no hash, previous hash or scheme. */
const AUDIT_OPEN_COLUMNS = ["id", "occurred_at", "actor_user_id", "actor_email", "trial_id", "action", "entity_type", "entity_id", "visibility", "old_values", "new_values", "reason"] as const;

/**
 * Audit rows for a trial. Blinded viewers pass openOnly: closed rows are never selected, and
 * neither are the hash columns (each open row's prev_hash is a hash of the row before it, which
 * may be closed).
 */
export async function fetchAuditEvents(f: AuditFilter & { openOnly: true }): Promise<AuditEventOpenRow[]>;
export async function fetchAuditEvents(f: AuditFilter): Promise<AuditEventRow[] | AuditEventOpenRow[]>;
export async function fetchAuditEvents(f: AuditFilter): Promise<AuditEventRow[] | AuditEventOpenRow[]> {
  // Blinded: the blinded account through the view of open rows without hashes; it has no grant on
  // audit_events itself, so even a query that forgot the filter could not select a closed row.
  const q = f.openOnly ? blindDb("audit_events_open").select(AUDIT_OPEN_COLUMNS).where("visibility", "open") : db("audit_events");
  q.orderBy("id", "desc").limit(f.limit ?? 2000);
  if (f.trialId !== undefined) q.where("trial_id", f.trialId);
  return q;
}
