/**
 * Interim data against the real database: every write appends exactly one audit row (with the
 * right visibility) and the chain verifies; a stale or concurrent save is a 409, never a lost
 * update; bad input and bad CSVs write nothing; a connection killed in the middle of an upload
 * leaves nothing behind.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { asClosedConnection } from "@/db/knex";
import { ZodError } from "zod";
import { verifyAuditChain } from "@/db/audit";
import { insertDesignVersion, markDesignLocked } from "@/db/queries/designs";
import { insertSignature, recordHash } from "@/db/queries/signatures";
import { createPlannedLooks } from "@/db/queries/analyses";
import { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "@/db/seeds/demo";
import { expandLooks } from "@/lib/stats/looks";
import type { Design } from "@/lib/stats/types";
import { HttpError, errorResponse } from "@/lib/http";
import { WriteNotSavedError } from "@/db/errors";
import type { AuditEventRow, PublicUser } from "@/db/types";
import {
  confirmPatientUpload,
  lockAnalysis,
  openLookForEntry,
  previewPatientUpload,
  reopenAnalysis,
  saveArmCounts,
} from "@/lib/analyses/service";
import { db, giveRole, killMidTransaction, makeTrial, makeUser, ownerKnex, resetDatabase } from "./support/db";
import jstat from "jstat";
import type { TrialRow } from "@/db/types";
import { switchToCountLevel } from "@/lib/analyses/service";
import { checkTrialAccess } from "@/lib/auth";
/** The statistician's access for the data-entry services (they re-check enterData themselves). */
const enter = (u: Parameters<typeof checkTrialAccess>[0], trialId: number) => checkTrialAccess(u, trialId, "enterData");

type Statistician = PublicUser & { password: string };
let stat: Statistician;

async function trialWithLockedDesign(design: Design, designType: "single" | "two") {
  const trialId = await makeTrial({ designType });
  await giveRole(stat.id, trialId, "unblinded_statistician");
  await db.transaction(async (tx) => {
    const d = await insertDesignVersion(tx, { trialId, spec: design, createdBy: stat.id, amendmentReason: null });
    const sig = await insertSignature(tx, { userId: stat.id, signerName: stat.name, signerEmail: stat.email, meaning: "design approved", entityType: "design", entityId: d.id, record: design });
    await markDesignLocked(tx, d.id, sig.id);
    const nMax = design.arms === "single" ? design.nMax : design.nMaxPerArm;
    await createPlannedLooks(tx, trialId, d.id, expandLooks(design.looks, nMax));
  });
  const arms = await db("arms").where({ trial_id: trialId }).orderBy("sort_order");
  const looks = await db("analyses").where({ trial_id: trialId }).orderBy("look_number");
  return { trialId, arms: arms as Array<{ id: number; label: string; arm_role: string }>, lookIds: looks.map((l: { id: number }) => l.id) as number[] };
}

// A wrong signing password is refused and audited on purpose (an open row, no secret): counted apart.
const auditCount = async () => Number((await db("audit_events").whereNot({ action: "signature_password_failed" }).count({ n: "*" }).first())?.n ?? 0);
const lastAudit = async (): Promise<AuditEventRow> => db("audit_events").orderBy("id", "desc").first();
const look = async (id: number) => db("analyses").where({ id }).first();
const patientRows = async (id: number) => Number((await db("patient_outcomes").where({ analysis_id: id }).count({ n: "*" }).first())?.n ?? 0);

/** Runs a write and checks it appended exactly one audit row, of the given visibility, with an intact chain. */
async function expectOneAuditRow<T>(visibility: "open" | "closed", action: string, write: () => Promise<T>): Promise<T> {
  const before = await auditCount();
  const out = await write();
  expect(await auditCount()).toBe(before + 1);
  const row = await lastAudit();
  expect(row.visibility).toBe(visibility);
  expect(row.action).toBe(action);
  expect(row.actor_user_id).toBe(stat.id);
  expect((await verifyAuditChain(db)).ok).toBe(true);
  return out;
}

/** Runs a write that must fail and checks that nothing at all changed. */
async function expectNothingWritten(analysisId: number, write: () => Promise<unknown>, status?: number): Promise<unknown> {
  const [audits, before, rows, counts] = await Promise.all([auditCount(), look(analysisId), patientRows(analysisId), db("analysis_arm_counts").where({ analysis_id: analysisId })]);
  const err = await write().then(
    () => null,
    (e) => e,
  );
  expect(err, "the write should have been refused").not.toBeNull();
  if (status !== undefined) {
    expect(err).toBeInstanceOf(HttpError);
    expect((err as HttpError).status).toBe(status);
  }
  expect(await auditCount()).toBe(audits);
  expect(await look(analysisId)).toEqual(before);
  expect(await patientRows(analysisId)).toBe(rows);
  expect(await db("analysis_arm_counts").where({ analysis_id: analysisId })).toEqual(counts);
  return err;
}

const enc = (s: string) => new TextEncoder().encode(s);
const HEADER = "subject_id,arm,enrolment_date,evaluable,response,toxicity";

beforeAll(async () => {
  await resetDatabase();
  stat = await makeUser({ name: "Test Statistician" });
});

describe("two-arm look: open, counts, concurrency, lock, amendment", () => {
  let t: Awaited<ReturnType<typeof trialWithLockedDesign>>;
  let a1: number;
  beforeAll(async () => {
    t = await trialWithLockedDesign(TWO_ARM_DEMO_DESIGN, "two");
    a1 = t.lookIds[0];
  });
  const counts = (e: [number, number, number], c: [number, number, number]) => [
    { armId: t.arms[0].id, enrolled: e[0], evaluable: e[1], responders: e[2], toxicities: null },
    { armId: t.arms[1].id, enrolled: c[0], evaluable: c[1], responders: c[2], toxicities: null },
  ];

  it("creates one planned look per design look", async () => {
    expect(t.lookIds).toHaveLength(expandLooks(TWO_ARM_DEMO_DESIGN.looks, TWO_ARM_DEMO_DESIGN.nMaxPerArm).length);
    expect((await look(a1)).status).toBe("planned");
  });

  it("saving counts on a planned look is refused (409) and writes nothing", async () => {
    await expectNothingWritten(a1, async () => saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 1, cutoffDate: "2026-05-31", counts: counts([10, 9, 4], [10, 9, 2]) }), 409);
  });

  it("opening a look writes one open audit row", async () => {
    await expectOneAuditRow("open", "analysis_opened", async () => openLookForEntry(await enter(stat, t.trialId), a1, { rowVersion: 1, cutoffDate: "2026-05-31" }));
    expect(await look(a1)).toMatchObject({ status: "open", cutoff_date: "2026-05-31", row_version: 2 });
  });

  it("invalid counts are refused with field paths and write nothing", async () => {
    const err = await expectNothingWritten(a1, async () => saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 2, cutoffDate: "2026-05-31", counts: counts([10, 11, 4], [10, 9, 10]) }));
    expect(err).toBeInstanceOf(ZodError);
    const paths = (err as ZodError).issues.map((i) => i.path.join("."));
    expect(paths).toEqual(expect.arrayContaining(["counts.0.evaluable", "counts.1.responders"]));
    await expectNothingWritten(a1, async () => saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 2, cutoffDate: "2026-05-31", counts: counts([-1, 0, 0], [2.5, 1, 0]) }));
    // An arm missing, and a toxicity count on a design without a safety rule.
    await expectNothingWritten(a1, async () => saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 2, cutoffDate: "2026-05-31", counts: counts([3, 3, 1], [3, 3, 1]).slice(0, 1) }));
    await expectNothingWritten(a1, async () =>
      saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 2, cutoffDate: "2026-05-31", counts: counts([3, 3, 1], [3, 3, 1]).map((c) => ({ ...c, toxicities: 1 })) }),
    );
  });

  it("saving counts writes the counts, the pooled total and one closed audit row", async () => {
    const out = await expectOneAuditRow("closed", "counts_entered", async () =>
      saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 2, cutoffDate: "2026-05-31", counts: counts([21, 20, 9], [22, 20, 5]) }),
    );
    expect(out.enrolledTotal).toBe(43);
    expect(await look(a1)).toMatchObject({ enrolled_total: 43, row_version: 3 });
    const stored = await db("analysis_arm_counts").where({ analysis_id: a1 }).orderBy("arm_id");
    expect(stored.map((c: { enrolled: number; evaluable: number; responders: number }) => [c.enrolled, c.evaluable, c.responders])).toEqual([
      [21, 20, 9],
      [22, 20, 5],
    ]);
  });

  it("two concurrent saves from the same version: exactly one wins, the other gets 409, no lost update", async () => {
    const before = await auditCount();
    const results = await Promise.allSettled([
      saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 3, cutoffDate: "2026-05-31", counts: counts([24, 22, 10], [23, 21, 6]) }),
      saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 3, cutoffDate: "2026-05-31", counts: counts([25, 23, 11], [25, 22, 7]) }),
    ]);
    const won = results.filter((r) => r.status === "fulfilled");
    const lost = results.filter((r): r is PromiseRejectedResult => r.status === "rejected");
    expect(won).toHaveLength(1);
    expect(lost).toHaveLength(1);
    expect(lost[0].reason).toBeInstanceOf(HttpError);
    expect(lost[0].reason.status).toBe(409);
    expect(lost[0].reason.message).toMatch(/Someone else saved look 1/);
    expect(errorResponse(lost[0].reason).status).toBe(409);
    expect(await auditCount()).toBe(before + 1);
    // What is stored is exactly the winner's counts.
    const winner = (won[0] as PromiseFulfilledResult<{ counts: Array<{ enrolled: number }> }>).value;
    const stored = await db("analysis_arm_counts").where({ analysis_id: a1 }).orderBy("arm_id");
    expect(stored.map((c: { enrolled: number }) => c.enrolled)).toEqual(winner.counts.map((c) => c.enrolled));
    expect((await look(a1)).row_version).toBe(4);
    expect((await verifyAuditChain(db)).ok).toBe(true);
  });

  it("a save from a stale version is refused with 409 and writes nothing", async () => {
    await expectNothingWritten(a1, async () => saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 3, cutoffDate: "2026-05-31", counts: counts([1, 1, 1], [1, 1, 1]) }), 409);
  });

  it("locking needs the right password; a wrong one writes nothing", async () => {
    const failedBefore = await db("audit_events").where({ action: "signature_password_failed" }).count({ n: "*" }).first();
    const err = await expectNothingWritten(a1, async () => lockAnalysis(await enter(stat, t.trialId), a1, { rowVersion: 4, password: "not-my-password" }), 422);
    expect((err as Error).message).toMatch(/password is not correct/);
    const failedAfter = await db("audit_events").where({ action: "signature_password_failed" }).count({ n: "*" }).first();
    expect(Number(failedAfter?.n)).toBe(Number(failedBefore?.n) + 1);
  });

  it("locking signs the counts ('analysis locked') and writes one open audit row", async () => {
    const stored = await db("analysis_arm_counts").where({ analysis_id: a1 }).orderBy("arm_id");
    const out = await expectOneAuditRow("open", "analysis_locked", async () => lockAnalysis(await enter(stat, t.trialId), a1, { rowVersion: 4, password: stat.password }));
    const l = await look(a1);
    expect(l).toMatchObject({ status: "locked", lock_signature_id: out.signatureId });
    expect(l.locked_at).not.toBeNull();
    const sig = await db("signatures").where({ id: out.signatureId }).first();
    expect(sig).toMatchObject({ meaning: "analysis locked", entity_type: "analysis", entity_id: a1, user_id: stat.id });
    // The signature is bound to exactly the counts that were locked.
    const record = {
      trialId: t.trialId,
      analysisId: a1,
      lookNumber: 1,
      amendment: 0,
      cutoffDate: "2026-05-31",
      counts: stored.map((c: { arm_id: number; enrolled: number; treated: number | null; evaluable: number; responders: number; toxicities: number | null }) => ({
        armId: c.arm_id,
        enrolled: c.enrolled,
        treated: c.treated,
        evaluable: c.evaluable,
        responders: c.responders,
        toxicities: c.toxicities,
      })),
    };
    expect(sig.record_hash).toBe(recordHash(record));
    // Blinded readers of the audit trail cannot see the counts: the lock row carries none.
    expect(JSON.stringify((await lastAudit()).new_values)).not.toMatch(/responders/);
  });

  it("a locked look cannot change (409): counts, upload, open, lock again", async () => {
    await expectNothingWritten(a1, async () => saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 5, cutoffDate: "2026-05-31", counts: counts([1, 1, 1], [1, 1, 1]) }), 409);
    await expectNothingWritten(a1, async () => confirmPatientUpload(await enter(stat, t.trialId), a1, enc(`${HEADER}\nS-1,control,2026-05-01,yes,no,\n`), { rowVersion: 5 }), 409);
    await expectNothingWritten(a1, async () => openLookForEntry(await enter(stat, t.trialId), a1, { rowVersion: 5, cutoffDate: "2026-05-31" }), 409);
    await expectNothingWritten(a1, async () => lockAnalysis(await enter(stat, t.trialId), a1, { rowVersion: 5, password: stat.password }), 409);
  });

  it("a correction needs a reason; reopening is an amendment and the old counts stay in the audit trail", async () => {
    const err = await expectNothingWritten(a1, async () => reopenAnalysis(await enter(stat, t.trialId), a1, { rowVersion: 5, reason: "typo" }));
    expect(err).toBeInstanceOf(ZodError);
    const reason = "Two responders in the control arm were miscoded at site 3.";
    // Two rows: the open one says a correction was opened; the reason (free text about closed data) is in a closed one.
    const before = await auditCount();
    await reopenAnalysis(await enter(stat, t.trialId), a1, { rowVersion: 5, reason });
    expect(await auditCount()).toBe(before + 2);
    const [closedRow, openRow] = await db("audit_events").orderBy("id", "desc").limit(2);
    expect(openRow).toMatchObject({ action: "analysis_reopened_for_amendment", visibility: "open", reason: null });
    expect(closedRow).toMatchObject({ action: "correction_reason_recorded", visibility: "closed", reason });
    expect((await verifyAuditChain(db)).ok).toBe(true);
    expect(await look(a1)).toMatchObject({ status: "open", amendment_count: 1, locked_at: null, lock_signature_id: null, review_version: 1 });
    const oldCounts = (await db("analysis_arm_counts").where({ analysis_id: a1 }).orderBy("arm_id")).map((c: { enrolled: number }) => c.enrolled);
    await expectOneAuditRow("closed", "counts_entered", async () =>
      saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 6, cutoffDate: "2026-05-31", counts: counts([24, 22, 10], [23, 21, 4]), reason }),
    );
    const row = await lastAudit();
    const oldValues = JSON.parse(row.old_values!);
    const newValues = JSON.parse(row.new_values!);
    expect(oldValues.counts.map((c: { enrolled: number }) => c.enrolled)).toEqual(oldCounts);
    expect(newValues.counts[1].responders).toBe(4);
    expect(newValues.amendment).toBe(1);
    expect(row.reason).toBe(reason);
  });

  it("a cut-off not after the previous look's is refused", async () => {
    const a2 = t.lookIds[1];
    const err = await expectNothingWritten(a2, async () => openLookForEntry(await enter(stat, t.trialId), a2, { rowVersion: 1, cutoffDate: "2026-05-31" }), 422);
    expect((err as Error).message).toMatch(/after the previous look's cut-off \(2026-05-31\)/);
  });

  it("a look of another trial is a 404", async () => {
    const other = await trialWithLockedDesign(TWO_ARM_DEMO_DESIGN, "two");
    await expectNothingWritten(other.lookIds[0], async () => openLookForEntry(await enter(stat, t.trialId), other.lookIds[0], { rowVersion: 1, cutoffDate: "2026-05-31" }), 404);
  });
});

describe("patient-level upload", () => {
  let t: Awaited<ReturnType<typeof trialWithLockedDesign>>;
  let a1: number;
  beforeAll(async () => {
    t = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    a1 = t.lookIds[0];
    await openLookForEntry(await enter(stat, t.trialId), a1, { rowVersion: 1, cutoffDate: "2026-06-30" });
  });
  const good = [
    HEADER,
    "P-01,single,2026-03-02,yes,yes,no",
    "P-02,Arm A,2026-03-09,yes,no,yes",
    "P-03,single,2026-04-01,no,,no",
    "P-04,single,2026-06-30,1,1,0",
  ].join("\n");

  it("preview writes nothing and reports the derived counts", async () => {
    const before = await auditCount();
    const p = await previewPatientUpload(await enter(stat, t.trialId), a1, enc(good));
    expect(p).toMatchObject({ ok: true, rowCount: 4, counts: [{ armId: t.arms[0].id, enrolled: 4, evaluable: 3, responders: 2, toxicities: 1 }] });
    expect(await auditCount()).toBe(before);
    expect(await patientRows(a1)).toBe(0);
  });

  const BAD: Array<[string, string, RegExp]> = [
    ["unknown arm", `${HEADER}\nP-01,placebo,2026-03-02,yes,yes,no\n`, /Unknown arm/],
    ["response on a non-evaluable patient", `${HEADER}\nP-01,single,2026-03-02,no,yes,no\n`, /not evaluable/],
    ["only rows after the cut-off", `${HEADER}\nP-01,single,2026-07-01,yes,yes,no\n`, /No patient in the file was enrolled on or before the data cut-off/],
    ["duplicate subject", `${HEADER}\nP-01,single,2026-03-02,yes,yes,no\nP-01,single,2026-03-03,yes,no,no\n`, /already appears on line 2/],
    ["missing column", "subject_id,arm,enrolment_date,evaluable,response\nP-01,single,2026-03-02,yes,yes\n", /"toxicity" is missing/],
    ["missing toxicity under a safety rule", `${HEADER}\nP-01,single,2026-03-02,yes,yes,\n`, /safety rule/],
  ];
  for (const [what, text, message] of BAD) {
    it(`a CSV with ${what} is reported by line and writes nothing on confirm`, async () => {
      const p = await previewPatientUpload(await enter(stat, t.trialId), a1, enc(text));
      expect(p.ok).toBe(false);
      if (!p.ok) expect(p.issues.map((i) => i.message).join(" | ")).toMatch(message);
      const v = (await look(a1)).row_version;
      const err = await expectNothingWritten(a1, async () => confirmPatientUpload(await enter(stat, t.trialId), a1, enc(text), { rowVersion: v }), 422);
      expect(((err as HttpError).details as { issues: unknown[] }).issues.length).toBeGreaterThan(0);
    });
  }

  it("a file that is not CSV (binary) writes nothing", async () => {
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
    const p = await previewPatientUpload(await enter(stat, t.trialId), a1, png);
    expect(p).toMatchObject({ ok: false, issues: [{ line: null, message: expect.stringMatching(/not a CSV file/) }] });
    await expectNothingWritten(a1, async () => confirmPatientUpload(await enter(stat, t.trialId), a1, png, { rowVersion: 2 }), 422);
  });

  it("confirm writes every row and the derived counts in one transaction, with one closed audit row", async () => {
    const out = await expectOneAuditRow("closed", "patient_data_uploaded", async () => confirmPatientUpload(await enter(stat, t.trialId), a1, enc(good), { rowVersion: 2, fileName: "look1.csv" }));
    expect(out.patientRows).toBe(4);
    expect(await patientRows(a1)).toBe(4);
    expect(await look(a1)).toMatchObject({ enrolled_total: 4, row_version: 3 });
    const c = await db("analysis_arm_counts").where({ analysis_id: a1 }).first();
    expect(c).toMatchObject({ enrolled: 4, evaluable: 3, responders: 2, toxicities: 1 });
    const nv = JSON.parse((await lastAudit()).new_values!);
    expect(nv).toMatchObject({ fileName: "look1.csv", patientRows: 4, enrolledTotal: 4 });
    expect(nv.fileSha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it("a connection killed in the middle of an upload leaves nothing behind, and the error is surfaced", async () => {
    // 1,000 patients need a design that allows them (counts above nMax are refused before any write).
    const big = await trialWithLockedDesign({ ...SINGLE_ARM_DEMO_DESIGN, nMax: 1000, looks: { kind: "list", sizes: [1000] } }, "single");
    const a1 = big.lookIds[0];
    await openLookForEntry(await enter(stat, big.trialId), a1, { rowVersion: 1, cutoffDate: "2026-06-30" });
    const v = (await look(a1)).row_version;
    const before = { audits: await auditCount(), rows: await patientRows(a1), counts: await db("analysis_arm_counts").where({ analysis_id: a1 }), look: await look(a1) };
    const lines = [HEADER];
    for (let i = 1; i <= 1000; i++) lines.push(`K-${String(i).padStart(4, "0")},single,2026-0${1 + (i % 6)}-1${i % 10},yes,${i % 3 ? "no" : "yes"},${i % 7 ? "no" : "yes"}`);
    // The upload inserts all its rows, then waits inside its transaction for the audit chain head.
    let peeked = -1;
    const err = await killMidTransaction(
      async () => confirmPatientUpload(await enter(stat, big.trialId), a1, enc(lines.join("\n")), { rowVersion: v }),
      async (owner) => {
        // Mid-transaction: the rows are there, uncommitted (read uncommitted sees them).
        const peek = await owner.transaction(async (trx) => trx("patient_outcomes").where({ analysis_id: a1 }).where("subject_id", "like", "K-%").count({ n: "*" }).first(), {
          isolationLevel: "read uncommitted",
        });
        peeked = Number(peek?.n);
      },
    );
    expect(peeked).toBe(1000);
    expect(err, "the failure must reach the caller").toBeInstanceOf(WriteNotSavedError);
    expect((err as Error).message).toMatch(/nothing was saved/);
    expect(errorResponse(err).status, "answered as 503").toBe(503);
    expect(await auditCount()).toBe(before.audits);
    expect(await patientRows(a1)).toBe(before.rows);
    expect(await db("patient_outcomes").where({ analysis_id: a1 }).where("subject_id", "like", "K-%").count({ n: "*" }).first()).toEqual({ n: 0 });
    expect(await db("analysis_arm_counts").where({ analysis_id: a1 })).toEqual(before.counts);
    expect(await look(a1)).toEqual(before.look);
    expect((await verifyAuditChain(db)).ok).toBe(true);
  });

  it("after the failure the same upload goes through", async () => {
    const v = (await look(a1)).row_version;
    await expectOneAuditRow("closed", "patient_data_uploaded", async () => confirmPatientUpload(await enter(stat, t.trialId), a1, enc(good), { rowVersion: v }));
  });
});

// ---------------------------------------------------------------------------------------------
// Issue 13, data entry side: each finding has its test, named after it.
// ---------------------------------------------------------------------------------------------

const { loadReview, loadReproducibilityRecord } = await import("@/lib/review/load-review");
const trialRow = async (id: number): Promise<TrialRow> => db("trials").where({ id }).first();
const single = (armId: number, c: { enrolled: number; treated: number; evaluable: number; responders: number; toxicities: number }) => [{ armId, ...c }];

/** Opens look `i` at the cut-off, saves the counts and locks it; returns the look's id. */
async function enterAndLock(t: Awaited<ReturnType<typeof trialWithLockedDesign>>, i: number, cutoffDate: string, counts: unknown[]) {
  const id = t.lookIds[i];
  await openLookForEntry(await enter(stat, t.trialId), id, { rowVersion: (await look(id)).row_version, cutoffDate });
  await saveArmCounts(await enter(stat, t.trialId), id, { rowVersion: (await look(id)).row_version, cutoffDate, counts });
  await lockAnalysis(await enter(stat, t.trialId), id, { rowVersion: (await look(id)).row_version, password: stat.password });
  return id;
}

describe("finding 1: the safety denominator is the number treated (evaluable for toxicity)", () => {
  it("8 with toxicity among 21 treated and 15 evaluable for response: the review uses 21 (P = 0.762, continue), not 15 (0.960, stop)", async () => {
    const t = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    const a1 = await enterAndLock(t, 0, "2026-06-30", single(t.arms[0].id, { enrolled: 21, treated: 21, evaluable: 15, responders: 4, toxicities: 8 }));
    expect(await db("analysis_arm_counts").where({ analysis_id: a1 }).first()).toMatchObject({ enrolled: 21, treated: 21, evaluable: 15, toxicities: 8 });
    const { review } = await loadReview(await trialRow(t.trialId), a1, asClosedConnection(db));
    // The demo design's toxicity prior is Beta(0.6, 1.4) with qmax 0.3: posterior Beta(8.6, 14.4).
    // jstat 1.9.6 (npm) as the independent Beta CDF (its continued fraction stops at 3e-7).
    expect(Math.abs(review.safety!.probAboveLimit - (1 - jstat.jStat.beta.cdf(0.3, 8.6, 14.4)))).toBeLessThan(1e-6);
    expect(Math.abs(1 - jstat.jStat.beta.cdf(0.3, 8.6, 8.4) - 0.9597)).toBeLessThan(1e-4); // what the 15 would have given
    expect(review.safety!.probAboveLimit.toFixed(3)).toBe("0.762");
    expect(review.safety!).toMatchObject({ treated: 21, toxicities: 8, crossed: false });
    expect(review.decision.action).not.toBe("stop");
    // The JSON record says which count is which.
    const record = await loadReproducibilityRecord(await trialRow(t.trialId), a1, asClosedConnection(db));
    expect(record.inputs.looks[0].counts[0]).toMatchObject({ enrolled: 21, treated: 21, evaluable: 15, responders: 4, toxicities: 8 });
    expect(record.outputs.arms[0]).toMatchObject({ treated: 21, evaluable: 15 });
  });

  it("more toxicities than patients evaluable for response are accepted and the review computes", async () => {
    const t = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    const a1 = await enterAndLock(t, 0, "2026-06-30", single(t.arms[0].id, { enrolled: 12, treated: 12, evaluable: 3, responders: 1, toxicities: 9 }));
    const { review } = await loadReview(await trialRow(t.trialId), a1, asClosedConnection(db));
    expect(review.safety).toMatchObject({ treated: 12, toxicities: 9 });
  });

  it("toxicities above the number treated are refused (422) and write nothing", async () => {
    const t = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    const a1 = t.lookIds[0];
    await openLookForEntry(await enter(stat, t.trialId), a1, { rowVersion: 1, cutoffDate: "2026-06-30" });
    const err = await expectNothingWritten(a1, async () =>
      saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 2, cutoffDate: "2026-06-30", counts: single(t.arms[0].id, { enrolled: 21, treated: 7, evaluable: 15, responders: 4, toxicities: 8 }) }),
    );
    expect((err as ZodError).issues.map((i) => i.path.join("."))).toEqual(["counts.0.toxicities"]);
  });
});

describe("finding 3: lock-time validation against the locked design and the neighbouring locked looks", () => {
  let t: Awaited<ReturnType<typeof trialWithLockedDesign>>;
  let arm: number;
  beforeAll(async () => {
    t = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    arm = t.arms[0].id;
  });

  it("counts above the maximum sample size (nMax 40) are refused at save, with a message, and write nothing", async () => {
    const a1 = t.lookIds[0];
    await openLookForEntry(await enter(stat, t.trialId), a1, { rowVersion: 1, cutoffDate: "2026-06-30" });
    const err = await expectNothingWritten(a1, async () =>
      saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 2, cutoffDate: "2026-06-30", counts: single(arm, { enrolled: 41, treated: 41, evaluable: 40, responders: 10, toxicities: 2 }) }),
    );
    expect((err as ZodError).issues[0].message).toMatch(/maximum sample size for an arm \(40\)/);
    expect(errorResponse(err).status).toBe(422);
  });

  it("counts that break the design but were stored by other means are refused at lock (422) and nothing changes", async () => {
    const a1 = t.lookIds[0];
    // As if stored before this check existed: 41 enrolled, 41 evaluable, more than the design's 40.
    await db("analysis_arm_counts").insert({ analysis_id: a1, arm_id: arm, enrolled: 41, treated: 41, evaluable: 41, responders: 10, toxicities: 2 });
    const err = await expectNothingWritten(a1, async () => lockAnalysis(await enter(stat, t.trialId), a1, { rowVersion: 2, password: stat.password }), 422);
    expect((err as Error).message).toMatch(/^Look 1 was not locked: .*maximum sample size/);
    expect(((err as HttpError).details as { issues: Array<{ path: string }> }).issues.map((i) => i.path)).toEqual(["counts.0.enrolled"]);
    await db("analysis_arm_counts").where({ analysis_id: a1 }).delete();
  });

  it("the extreme data the checks allow (every count at nMax, and every count at 0) lock and the review computes without throwing", async () => {
    const a1 = t.lookIds[0];
    await saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 2, cutoffDate: "2026-06-30", counts: single(arm, { enrolled: 0, treated: 0, evaluable: 0, responders: 0, toxicities: 0 }) });
    await lockAnalysis(await enter(stat, t.trialId), a1, { rowVersion: 3, password: stat.password });
    const r0 = (await loadReview(await trialRow(t.trialId), a1, asClosedConnection(db))).review;
    expect(r0.current).toMatchObject({ n: 0, treated: 0, toxicities: 0 });
    const a2 = await enterAndLock(t, 1, "2026-09-30", single(arm, { enrolled: 40, treated: 40, evaluable: 40, responders: 40, toxicities: 40 }));
    const r = (await loadReview(await trialRow(t.trialId), a2, asClosedConnection(db))).review;
    expect(r.decision).toMatchObject({ action: "stop", stop: "safety" });
    expect(r.history.map((h) => h.n)).toEqual([0, 40]);
    // Two arms at nMaxPerArm (60) on both arms, responders at the extremes.
    const two = await trialWithLockedDesign(TWO_ARM_DEMO_DESIGN, "two");
    const c = (e: number, x: number) => ({ enrolled: e, treated: null, evaluable: e, responders: x, toxicities: null });
    const b1 = await enterAndLock(two, 0, "2026-06-30", [
      { armId: two.arms[0].id, ...c(60, 60) },
      { armId: two.arms[1].id, ...c(60, 0) },
    ]);
    expect((await loadReview(await trialRow(two.trialId), b1, asClosedConnection(db))).review.current.evaluation.final).toBe(true);
  });

  it("cumulative counts may not fall below the previous locked look's (each field), and write nothing", async () => {
    const fresh = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    const armId = fresh.arms[0].id;
    await enterAndLock(fresh, 0, "2026-06-30", single(armId, { enrolled: 12, treated: 11, evaluable: 10, responders: 4, toxicities: 2 }));
    const a2 = fresh.lookIds[1];
    await openLookForEntry(await enter(stat, fresh.trialId), a2, { rowVersion: 1, cutoffDate: "2026-09-30" });
    const base = { enrolled: 22, treated: 21, evaluable: 20, responders: 6, toxicities: 3 };
    for (const [field, value] of [
      ["enrolled", 11],
      ["treated", 10],
      ["evaluable", 9],
      ["responders", 3],
      ["toxicities", 1],
    ] as const) {
      const bad = { ...base, [field]: value };
      if (field === "enrolled") Object.assign(bad, { treated: 11, evaluable: 10 });
      const err = await expectNothingWritten(a2, async () => saveArmCounts(await enter(stat, fresh.trialId), a2, { rowVersion: 2, cutoffDate: "2026-09-30", counts: single(armId, bad) }), 422);
      expect((err as Error).message).toMatch(/below the \d+ of locked look 1; counts are cumulative/);
      expect(((err as HttpError).details as { issues: Array<{ path: string }> }).issues.map((i) => i.path)).toContain(`counts.0.${field}`);
    }
    // Equal counts are allowed (no new patient between the looks).
    await saveArmCounts(await enter(stat, fresh.trialId), a2, { rowVersion: 2, cutoffDate: "2026-09-30", counts: single(armId, { enrolled: 12, treated: 11, evaluable: 10, responders: 4, toxicities: 2 }) });
  });

  it("a reopened earlier look may not rise above the later locked look's counts, at save or at lock", async () => {
    const fresh = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    const armId = fresh.arms[0].id;
    const a1 = await enterAndLock(fresh, 0, "2026-06-30", single(armId, { enrolled: 12, treated: 11, evaluable: 10, responders: 4, toxicities: 2 }));
    await enterAndLock(fresh, 1, "2026-09-30", single(armId, { enrolled: 22, treated: 21, evaluable: 20, responders: 6, toxicities: 3 }));
    await reopenAnalysis(await enter(stat, fresh.trialId), a1, { rowVersion: (await look(a1)).row_version, reason: "Site 2 recoded one responder after query." });
    const v = (await look(a1)).row_version;
    const err = await expectNothingWritten(
      a1,
      async () => saveArmCounts(await enter(stat, fresh.trialId), a1, { rowVersion: v, cutoffDate: "2026-06-30", counts: single(armId, { enrolled: 12, treated: 11, evaluable: 10, responders: 7, toxicities: 2 }) }),
      422,
    );
    expect((err as Error).message).toMatch(/responders \(7\) is above the 6 of the later locked look 2/);
  });
});

describe("finding 6: CSV rows dated after the cut-off are left out and reported", () => {
  it("the preview lists them, confirm returns the same report, stores only the look's rows and audits the excluded lines", async () => {
    const t = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    const a1 = t.lookIds[0];
    await openLookForEntry(await enter(stat, t.trialId), a1, { rowVersion: 1, cutoffDate: "2026-06-30" });
    const text = [HEADER, "P-01,single,2026-03-02,yes,yes,no", "P-02,single,2026-07-01,yes,no,yes", "P-03,single,2026-06-30,no,,yes", "P-04,single,2026-08-15,yes,yes,no"].join("\n");
    const want = {
      count: 2,
      cutoffDate: "2026-06-30",
      rows: [
        { line: 3, subjectId: "P-02", enrolmentDate: "2026-07-01" },
        { line: 5, subjectId: "P-04", enrolmentDate: "2026-08-15" },
      ],
    };
    const p = await previewPatientUpload(await enter(stat, t.trialId), a1, enc(text));
    expect(p).toMatchObject({ ok: true, rowCount: 4, includedRows: 2, excluded: want, counts: [{ enrolled: 2, treated: 2, evaluable: 1, responders: 1, toxicities: 1 }] });
    const out = await expectOneAuditRow("closed", "patient_data_uploaded", async () => confirmPatientUpload(await enter(stat, t.trialId), a1, enc(text), { rowVersion: 2 }));
    expect(out).toMatchObject({ patientRows: 2, enrolledTotal: 2, excluded: want });
    expect((await db("patient_outcomes").where({ analysis_id: a1 }).orderBy("source_line")).map((r: { subject_id: string }) => r.subject_id)).toEqual(["P-01", "P-03"]);
    expect(JSON.parse((await lastAudit()).new_values!).excludedAfterCutoff).toEqual({ count: 2, lines: [3, 5] });
  });
});

describe("finding 6: a look is patient-level or count-level, never both", () => {
  let t: Awaited<ReturnType<typeof trialWithLockedDesign>>;
  let a1: number;
  const file = [HEADER, "P-01,single,2026-03-02,yes,yes,no", "P-02,single,2026-03-09,yes,no,yes"].join("\n");
  beforeAll(async () => {
    t = await trialWithLockedDesign(SINGLE_ARM_DEMO_DESIGN, "single");
    a1 = t.lookIds[0];
    await openLookForEntry(await enter(stat, t.trialId), a1, { rowVersion: 1, cutoffDate: "2026-06-30" });
    await confirmPatientUpload(await enter(stat, t.trialId), a1, enc(file), { rowVersion: 2 });
  });

  it("hand-editing the counts of a patient-level look is refused (409) with how to switch, and writes nothing", async () => {
    const err = await expectNothingWritten(
      a1,
      async () => saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 3, cutoffDate: "2026-06-30", counts: single(t.arms[0].id, { enrolled: 3, treated: 3, evaluable: 2, responders: 2, toxicities: 1 }) }),
      409,
    );
    expect((err as Error).message).toMatch(/patient-level: its counts are derived from its 2 uploaded patient rows.*switch the look to count-level entry/);
  });

  it("the switch needs a reason; with one it removes the patient rows, keeps the counts and records a closed audit entry", async () => {
    const err = await expectNothingWritten(a1, async () => switchToCountLevel(await enter(stat, t.trialId), a1, { rowVersion: 3, reason: "fix" }));
    expect(err).toBeInstanceOf(ZodError);
    const counts = await db("analysis_arm_counts").where({ analysis_id: a1 });
    const reason = "The data-capture export for site 4 is late; counts confirmed by phone.";
    const out = await expectOneAuditRow("closed", "switched_to_count_level", async () => switchToCountLevel(await enter(stat, t.trialId), a1, { rowVersion: 3, reason }));
    expect(out).toEqual({ rowVersion: 4, dataLevel: "count", removedPatientRows: 2 });
    expect(await patientRows(a1)).toBe(0);
    expect(await db("analysis_arm_counts").where({ analysis_id: a1 })).toEqual(counts);
    const row = await lastAudit();
    expect(row.reason).toBe(reason);
    expect(JSON.parse(row.old_values!)).toMatchObject({ dataLevel: "patient", patientRows: 2 });
  });

  it("a count-level look takes typed counts; switching it again is a 409; an upload makes it patient-level again", async () => {
    await saveArmCounts(await enter(stat, t.trialId), a1, { rowVersion: 4, cutoffDate: "2026-06-30", counts: single(t.arms[0].id, { enrolled: 3, treated: 3, evaluable: 2, responders: 2, toxicities: 1 }) });
    await expectNothingWritten(a1, async () => switchToCountLevel(await enter(stat, t.trialId), a1, { rowVersion: 5, reason: "Nothing to switch here at all." }), 409);
    await confirmPatientUpload(await enter(stat, t.trialId), a1, enc(file), { rowVersion: 5 });
    expect(await patientRows(a1)).toBe(2);
    expect(await db("analysis_arm_counts").where({ analysis_id: a1 }).first()).toMatchObject({ enrolled: 2, evaluable: 2, responders: 1, treated: 2, toxicities: 1 });
  });
});

describe("audit chain verification script", () => {
  it("exits 0 on an intact chain and 1 naming the broken row after tampering", async () => {
    const { spawnSync } = await import("node:child_process");
    const run = () => spawnSync(process.execPath, ["node_modules/tsx/dist/cli.mjs", "--conditions=react-server", "scripts/verify-audit-chain.ts"], { encoding: "utf8", env: process.env });
    const ok = run();
    expect(ok.status, ok.stderr).toBe(0);
    expect(ok.stdout).toMatch(/audit chain verified: \d+ rows/);
    const owner = ownerKnex();
    try {
      const target = await owner("audit_events").orderBy("id").offset(2).first("id");
      await owner.raw("DROP TRIGGER audit_events_refuse_update");
      await owner("audit_events").where({ id: target.id }).update({ reason: "rewritten later" });
      const broken = run();
      expect(broken.status).toBe(1);
      expect(broken.stderr).toContain(`BROKEN at row id ${target.id}`);
    } finally {
      await owner.destroy();
      await resetDatabase();
    }
  }, 120_000);
});
