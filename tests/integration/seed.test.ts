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

  it("tells a consistent story: each design was approved before the first patient and before any look's data, and looks were signed when locked", async () => {
    const trials = await db("trials").select("id", "code", "first_patient_on");
    for (const t of trials) {
      const design = await db("designs as d").join("signatures as s", "s.id", "d.signature_id").where("d.trial_id", t.id).first("d.created_at", "d.locked_at", "s.signed_at");
      const looks = await db("analyses as a").leftJoin("signatures as s", "s.id", "a.lock_signature_id").where("a.trial_id", t.id).whereNotNull("a.cutoff_date").orderBy("a.look_number").select("a.cutoff_date", "a.locked_at", "s.signed_at");
      const firstPatient = new Date(t.first_patient_on).getTime();
      expect(new Date(design.created_at).getTime()).toBeLessThan(new Date(design.locked_at).getTime());
      expect(new Date(design.locked_at).getTime()).toBeLessThan(firstPatient);
      expect(new Date(design.signed_at).getTime()).toBe(new Date(design.locked_at).getTime());
      expect(looks.length).toBeGreaterThan(0);
      for (const l of looks) {
        expect(new Date(design.locked_at).getTime()).toBeLessThan(new Date(l.cutoff_date).getTime());
        expect(new Date(l.cutoff_date).getTime()).toBeLessThan(new Date(l.locked_at).getTime());
        expect(new Date(l.signed_at).getTime()).toBe(new Date(l.locked_at).getTime());
      }
    }
  });
});
