/**
 * The test helper that empties the database between test files (support/db.ts, resetDatabase): it
 * must leave exactly the freshly migrated schema with no rows, whatever the test before it did.
 */
import { afterAll, describe, expect, it } from "vitest";
import { db, makeTrial, ownerKnex, resetDatabase } from "./support/db";

const owner = ownerKnex();
afterAll(async () => {
  await resetDatabase();
  await owner.destroy();
});

const triggerExists = async (name: string) => ((await owner.raw("SELECT COUNT(*) AS n FROM information_schema.TRIGGERS WHERE TRIGGER_SCHEMA = DATABASE() AND TRIGGER_NAME = ?", [name]))[0] as Array<{ n: number }>)[0].n === 1;

describe("resetDatabase", () => {
  it("empties every table and starts the ids at 1 again", async () => {
    await resetDatabase();
    const first = await makeTrial();
    await makeTrial();
    await resetDatabase();
    expect(Number((await db("trials").count({ n: "*" }).first())?.n)).toBe(0);
    expect(Number((await db("arms").count({ n: "*" }).first())?.n)).toBe(0);
    expect(await makeTrial()).toBe(first);
  });

  it("puts back a trigger a test dropped", async () => {
    await owner.raw("DROP TRIGGER audit_events_refuse_update");
    expect(await triggerExists("audit_events_refuse_update")).toBe(false);
    await resetDatabase();
    expect(await triggerExists("audit_events_refuse_update")).toBe(true);
  });

  it("migrates up again after a test went down the migrations", async () => {
    await owner.migrate.down();
    const [, pendingBefore] = (await owner.migrate.list()) as [unknown[], unknown[]];
    expect(pendingBefore.length).toBe(1);
    await resetDatabase();
    const [, pendingAfter] = (await owner.migrate.list()) as [unknown[], unknown[]];
    expect(pendingAfter.length).toBe(0);
  });
});
