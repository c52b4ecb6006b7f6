import { afterAll, describe, expect, it } from "vitest";
import { ownerKnex, resetDatabase } from "./support/db";
import { migrationNames } from "@/db/migrations";

const owner = ownerKnex();
afterAll(async () => {
  await resetDatabase();
  await owner.destroy();
});

async function tables(): Promise<string[]> {
  const [rows] = await owner.raw("SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE() AND table_name NOT LIKE 'knex_%'");
  return (rows as { t: string }[]).map((r) => r.t).sort();
}

describe("migrations", () => {
  it("run all the way down and back up again", async () => {
    await owner.migrate.rollback(undefined, true);
    expect(await tables()).toEqual([]);
    const [, applied] = await owner.migrate.latest();
    expect(applied).toEqual(migrationNames);
    expect(await tables()).toEqual(
      expect.arrayContaining(["users", "trials", "arms", "trial_memberships", "designs", "analyses", "analysis_arm_counts", "patient_outcomes", "audit_events", "signatures", "recommendations"]),
    );
  });

  it("step down one at a time and each down undoes its up", async () => {
    await owner.migrate.latest();
    const before = await tables();
    await owner.migrate.down();
    const after = await tables();
    // The last migration either drops a table or a trigger; in both cases nothing else changes.
    expect(after.length === before.length || after.length === before.length - 1).toBe(true);
    await owner.migrate.up();
    expect(await tables()).toEqual(before);
  });
});
