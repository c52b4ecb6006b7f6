import { beforeAll, describe, expect, it } from "vitest";
import { isDatabaseEmpty, seedDemo, DEMO_ACCOUNTS } from "@/db/seeds/demo";
import { verifyAuditChain } from "@/db/audit";
import { db, resetDatabase } from "./support/db";

beforeAll(resetDatabase);

async function counts() {
  const out: Record<string, number> = {};
  for (const t of ["users", "trials", "arms", "trial_memberships", "designs", "analyses", "analysis_arm_counts", "recommendations"]) {
    const r = await db(t).count({ n: "*" }).first();
    out[t] = Number(r?.n);
  }
  return out;
}

describe("demo seed", () => {
  it("fills an empty database with one account per role and two trials, all audited", async () => {
    expect(await isDatabaseEmpty()).toBe(true);
    await seedDemo();
    const c = await counts();
    expect(c.users).toBe(DEMO_ACCOUNTS.length);
    expect(c.trials).toBe(2);
    expect(c.arms).toBe(3);
    expect(c.designs).toBe(2);
    expect((await verifyAuditChain(db)).ok).toBe(true);
  });

  it("is not run twice: the database is no longer empty, so scripts/seed.ts skips it", async () => {
    expect(await isDatabaseEmpty()).toBe(false);
  });

  it("a second seed into a non-empty database fails as a whole and leaves the first copy untouched", async () => {
    const before = await counts();
    await expect(seedDemo()).rejects.toThrow();
    expect(await counts()).toEqual(before);
  });
});
