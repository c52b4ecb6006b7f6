import type { AuditEventRow } from "@/db/types";

/** An audit row as sent to the browser: times as UTC ISO strings, values as parsed JSON. */
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
  hash: string;
};

function parse(v: string | null): unknown {
  if (v === null) return null;
  try {
    return JSON.parse(v);
  } catch {
    return v;
  }
}

export function auditEntryJson(r: AuditEventRow): AuditEntryJson {
  return {
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
    hash: r.hash,
  };
}
