import type { AuditEventOpenRow } from "@/db/types";

/**
 * An audit row as sent to the browser: times as UTC ISO strings, values as parsed JSON. `hash`
 * is present only for viewers who may see closed entries: a blinded viewer gets no hash of any
 * row (a row's hash chains over the closed row before it), and no hash inside the values either.
 */
export type AuditEntryJson = {
  id: number;
  occurredAt: string;
  actorEmail: string | null;
  action: string;
  entityType: string;
  entityId: string | null;
  visibility: "open" | "closed";
  oldValues: unknown;
  newValues: unknown;
  reason: string | null;
  hash?: string;
};

function parse(v: string | null): unknown {
  if (v === null) return null;
  try {
    return JSON.parse(v);
  } catch {
    return v;
  }
}

/** Drops every key naming a hash (recordHash, contentHash, ...), at any depth. */
function withoutHashes(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(withoutHashes);
  if (v && typeof v === "object") return Object.fromEntries(Object.entries(v as Record<string, unknown>).filter(([k]) => !/hash/i.test(k)).map(([k, x]) => [k, withoutHashes(x)]));
  return v;
}

/** `hashes`: true only for viewers with viewAuditClosed. The default is the blinded form. */
export function auditEntryJson(r: AuditEventOpenRow & { hash?: string }, opts: { hashes: boolean } = { hashes: false }): AuditEntryJson {
  const base = {
    id: Number(r.id),
    occurredAt: new Date(r.occurred_at).toISOString(),
    actorEmail: r.actor_email,
    action: r.action,
    entityType: r.entity_type,
    entityId: r.entity_id,
    visibility: r.visibility,
    oldValues: parse(r.old_values),
    newValues: parse(r.new_values),
    reason: r.reason,
  };
  if (opts.hashes && r.hash) return { ...base, hash: r.hash };
  return { ...base, oldValues: withoutHashes(base.oldValues), newValues: withoutHashes(base.newValues) };
}
