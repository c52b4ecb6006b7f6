/**
 * Finding 1's migrations: rows stored before `treated` existed counted toxicities among all enrolled
 * patients, so the backfill sets treated = enrolled where toxicities were recorded (a patient row with
 * a toxicity outcome becomes treated), and leaves treated null where no toxicity was recorded.
 */
import { afterAll, describe, expect, it } from "vitest";
import { db, makeTrial, ownerKnex, resetDatabase } from "./support/db";

const owner = ownerKnex();
afterAll(async () => {
  await resetDatabase();
  await owner.destroy();
});

describe("finding 1: the treated columns and their backfill", () => {
  it("backfills treated = enrolled for counts with toxicities, true for patient rows with a toxicity outcome, null otherwise", async () => {
    await resetDatabase();
    const trialId = await makeTrial({ designType: "single" });
    const arm = await db("arms").where({ trial_id: trialId }).first();
    const [designId] = await db("designs").insert({ trial_id: trialId, version: 1, status: "locked", spec: "{}", row_version: 1 });
    const looks = await db("analyses").insert({ trial_id: trialId, design_id: designId, look_number: 1, planned_n: 10, status: "open", amendment_count: 0, row_version: 1 });
    const [a1] = looks;
    const [a2] = await db("analyses").insert({ trial_id: trialId, design_id: designId, look_number: 2, planned_n: 20, status: "open", amendment_count: 0, row_version: 1 });
    // Back to the schema before the two migrations.
    while (Number(await owner.migrate.currentVersion()) >= 20261203030100) await owner.migrate.down();
    expect(await owner.schema.hasColumn("analysis_arm_counts", "treated")).toBe(false);
    expect(await owner.schema.hasColumn("patient_outcomes", "treated")).toBe(false);
    await owner("analysis_arm_counts").insert([
      { analysis_id: a1, arm_id: arm.id, enrolled: 21, evaluable: 15, responders: 4, toxicities: 8 },
      { analysis_id: a2, arm_id: arm.id, enrolled: 30, evaluable: 28, responders: 9, toxicities: null },
    ]);
    await owner("patient_outcomes").insert([
      { analysis_id: a1, subject_id: "P-1", arm_id: arm.id, enrolled_on: "2026-01-05", evaluable: true, responder: true, toxicity: false, source_line: 2 },
      { analysis_id: a1, subject_id: "P-2", arm_id: arm.id, enrolled_on: "2026-01-06", evaluable: false, responder: null, toxicity: null, source_line: 3 },
    ]);
    await owner.migrate.latest();
    const counts = await db("analysis_arm_counts").orderBy("analysis_id");
    expect(counts.map((c: { treated: number | null }) => c.treated)).toEqual([21, null]);
    const rows = await db("patient_outcomes").orderBy("source_line");
    expect(rows.map((r: { treated: number | null }) => r.treated)).toEqual([1, null]);
  });
});
