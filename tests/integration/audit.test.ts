import { beforeAll, describe, expect, it } from "vitest";
import { appendAudit, verifyAuditChain } from "@/db/audit";
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
});
