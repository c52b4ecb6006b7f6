import { beforeAll, describe, expect, it } from "vitest";
import { GENESIS_HASH, appendAudit, auditRowHash, verifyAuditChain } from "@/db/audit";
import { db, ownerKnex, resetDatabase } from "./support/db";

beforeAll(resetDatabase);

async function append(n: number) {
  for (let i = 0; i < n; i++) {
    await db.transaction((tx) =>
      appendAudit(tx, { actorUserId: null, actorEmail: "t@test.example", trialId: null, action: "test_event", entityType: "test", entityId: i, visibility: i % 2 ? "closed" : "open", newValues: { i } }),
    );
  }
}

describe("audit trail", () => {
  it("chains every row to the previous one and verifies", async () => {
    await append(5);
    const check = await verifyAuditChain(db);
    expect(check).toEqual({ ok: true, checked: 5 });
  });

  it("concurrent appends queue on the chain head and keep the chain whole", async () => {
    const before = (await verifyAuditChain(db)).checked;
    await Promise.all(Array.from({ length: 8 }, () => append(2)));
    const check = await verifyAuditChain(db);
    expect(check).toEqual({ ok: true, checked: before + 16 });
  });

  it("the application's database account cannot UPDATE or DELETE an audit row", async () => {
    await expect(db("audit_events").update({ reason: "rewritten" })).rejects.toThrow(/denied|append-only/i);
    await expect(db("audit_events").delete()).rejects.toThrow(/denied|append-only/i);
  });

  it("even the owner account is refused by the triggers", async () => {
    const owner = ownerKnex();
    try {
      await expect(owner("audit_events").update({ reason: "rewritten" })).rejects.toThrow(/append-only/);
      await expect(owner("audit_events").where("id", 1).delete()).rejects.toThrow(/append-only/);
    } finally {
      await owner.destroy();
    }
  });

  it("a row changed behind the application's back breaks the chain, and the check says where", async () => {
    const owner = ownerKnex();
    try {
      await owner.raw("DROP TRIGGER audit_events_refuse_update");
      await owner("audit_events").where("id", 3).update({ new_values: JSON.stringify({ i: 999 }) });
      const check = await verifyAuditChain(db);
      expect(check.ok).toBe(false);
      if (!check.ok) expect(check.brokenAtId).toBe(3);
    } finally {
      await owner.destroy();
      await resetDatabase();
    }
  });

  it("rows written before keyed hashing (plain SHA-256) still verify, followed by keyed rows", async () => {
    await resetDatabase();
    const owner = ownerKnex();
    try {
      // Two legacy rows as the old code wrote them: plain SHA-256 with no scheme in the hash input.
      let prev = GENESIS_HASH;
      for (let i = 0; i < 2; i++) {
        const row = { occurred_at: new Date(Date.UTC(2026, 0, 1 + i)), actor_user_id: null, actor_email: "legacy@test.example", trial_id: null, action: "legacy_event", entity_type: "test", entity_id: String(i), visibility: "open" as const, old_values: null, new_values: JSON.stringify({ i }), reason: null, prev_hash: prev, hash_scheme: "sha256" as const };
        const hash = auditRowHash(row);
        await owner("audit_events").insert({ ...row, hash });
        prev = hash;
      }
      await owner.raw("INSERT INTO audit_chain_head (id, last_event_id, last_hash) VALUES (1, 2, ?)", [prev]);
    } finally {
      await owner.destroy();
    }
    await append(2);
    const schemes = (await db("audit_events").orderBy("id").select("hash_scheme")).map((r: { hash_scheme: string }) => r.hash_scheme);
    expect(schemes).toEqual(["sha256", "sha256", "hmac-sha256", "hmac-sha256"]);
    expect(await verifyAuditChain(db)).toEqual({ ok: true, checked: 4 });
  });

  it("without the right key the keyed rows do not verify (a forger cannot recompute them)", async () => {
    const check = await verifyAuditChain(db, "a-different-key-of-enough-length-0123456789");
    expect(check.ok).toBe(false);
    if (!check.ok) expect(check.brokenAtId).toBe(3);
  });

  it("an unkeyed row appended after keyed rows breaks the chain (no downgrade to plain SHA-256)", async () => {
    const owner = ownerKnex();
    try {
      const head = await owner("audit_chain_head").where({ id: 1 }).first();
      const row = { occurred_at: new Date(), actor_user_id: null, actor_email: "forger@test.example", trial_id: null, action: "forged_event", entity_type: "test", entity_id: "9", visibility: "open" as const, old_values: null, new_values: null, reason: null, prev_hash: head.last_hash as string, hash_scheme: "sha256" as const };
      const hash = auditRowHash(row);
      const [id] = await owner("audit_events").insert({ ...row, hash });
      await owner("audit_chain_head").where({ id: 1 }).update({ last_event_id: id, last_hash: hash });
      const check = await verifyAuditChain(db);
      expect(check.ok).toBe(false);
      if (!check.ok) {
        expect(check.brokenAtId).toBe(id);
        expect(check.problem).toMatch(/unkeyed row after keyed rows/);
      }
    } finally {
      await owner.destroy();
      await resetDatabase();
    }
  });
});
