/**
 * What if and pending outcomes against the real database.
 * - The what-if route answers unblinded roles with the engine's own verdict at the hypothetical
 *   counts, is refused to blinded roles, answers bad input with a clear 422, and writes nothing:
 *   the row count of every table and the audit trail are the same after every kind of call.
 * - Pending counts are stored per arm (typed or derived from the CSV's evaluable = pending), reach
 *   the review, and leave the predictive probability equal to the one with those patients moved to
 *   the future by hand.
 */
import { beforeAll, describe, expect, it, vi } from "vitest";
import { actAs, currentClaims, currentSession, routeContext } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));

import { db, makeUser, resetDatabase } from "./support/db";
import { asClosedConnection } from "@/db/knex";
import { seedDemo, SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "@/db/seeds/demo";
import { GET as whatIfGet } from "@/app/api/trials/[trialId]/analyses/[analysisId]/what-if/route";
import { lockAnalysis, openLookForEntry, saveArmCounts, confirmPatientUpload } from "@/lib/analyses/service";
import { HttpError } from "@/lib/http";
import { ZodError } from "zod";
import { loadReviewInput } from "@/lib/review/load-review";
import { computeReview } from "@/lib/review/compute-review";
import { decideAtLook } from "@/lib/stats/decision";
import type { PublicUser, TrialRow } from "@/db/types";
import { checkTrialAccess } from "@/lib/auth";
/** The statistician's access for the data-entry services (they re-check enterData themselves). */
const enter = (u: Parameters<typeof checkTrialAccess>[0], trialId: number) => checkTrialAccess(u, trialId, "enterData");

let users: Record<string, number>;
let single: { trialId: number; analysisId: number };
let two: { trialId: number; analysisId: number };

const call = async (who: number | null, t: { trialId: number; analysisId: number }, query: string) => {
  actAs(who);
  const res = await whatIfGet(new Request(`http://localhost/api/trials/${t.trialId}/analyses/${t.analysisId}/what-if?${query}`), routeContext({ trialId: String(t.trialId), analysisId: String(t.analysisId) }));
  return { status: res.status, body: await res.json() };
};

/** Every table's row count (the audit trail included): a read-only route must leave all of them alone. */
async function rowCounts(): Promise<Record<string, number>> {
  const tables = (await db.raw("SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE'"))[0] as Array<{ t: string }>;
  const out: Record<string, number> = {};
  for (const { t } of tables) out[t] = Number((await db(t).count({ n: "*" }).first())?.n ?? 0);
  return out;
}

async function lockedLook(code: string, lookNumber: number) {
  const trial = await db("trials").where({ code }).first();
  const a = await db("analyses").where({ trial_id: trial.id, look_number: lookNumber }).first();
  return { trialId: trial.id as number, analysisId: a.id as number };
}

beforeAll(async () => {
  await resetDatabase();
  await seedDemo();
  const rows = await db("users").select("id", "email");
  users = Object.fromEntries(rows.map((r: { id: number; email: string }) => [r.email.split("@")[0], r.id]));
  users.outsider = (await makeUser({ name: "Someone on no trial" })).id;
  single = await lockedLook("CRN-201", 2);
  two = await lockedLook("CRN-305", 1);
});

describe("GET .../what-if", () => {
  it("answers a DMC member and the unblinded statistician with the engine's verdict at the hypothetical counts", async () => {
    for (const who of [users.dmc, users.statistician]) {
      const r = await call(who, single, "patients=10&responders=3");
      expect(r.status).toBe(200);
      // CRN-201 look 2: 6 of 20; supposing 3 of 10 more gives 9 of 30, the planned look at 30.
      const ev = decideAtLook({ ...SINGLE_ARM_DEMO_DESIGN, safety: null }, { n: 30, responders: 9 });
      expect(r.body.to).toEqual({ n: 30, responders: 9, nControl: null, respondersControl: null });
      expect(r.body.plannedLook).toBe(30);
      expect(r.body.predictiveProbability).toBe(ev.predictiveProbability);
      expect(r.body.decision).toEqual(ev.decision);
    }
    const r2 = await call(users.dmc, two, "patientsT=20&respondersT=12&patientsC=20&respondersC=6");
    expect(r2.status).toBe(200);
    const ev2 = decideAtLook(TWO_ARM_DEMO_DESIGN, { nT: 40, respondersT: 21, nC: 40, respondersC: 11 });
    expect(r2.body.predictiveProbability).toBe(ev2.predictiveProbability);
    expect(r2.body.decision).toEqual(ev2.decision);
  });

  it("is refused to blinded roles, to someone on no trial, and without a session", async () => {
    for (const who of [users.sponsor, users.coordinator]) expect((await call(who, single, "patients=10&responders=3")).status).toBe(403);
    expect((await call(users.outsider, single, "patients=10&responders=3")).status).toBe(404);
    expect((await call(null, single, "patients=10&responders=3")).status).toBe(401);
  });

  it("answers bad input with a clear 422", async () => {
    const cases: Array<[string, RegExp]> = [
      ["patients=-1&responders=0", /patients cannot be negative/],
      ["patients=2.5&responders=1", /patients must be a whole number/],
      ["patients=abc&responders=1", /patients must be a number/],
      ["patients=10", /responders is missing/],
      ["patients=21&responders=3", /must not exceed the 20 patients still to come/],
      ["patients=5&responders=6", /must not exceed the 5 hypothetical patients/],
    ];
    for (const [q, msg] of cases) {
      const r = await call(users.dmc, single, q);
      expect(r.status, q).toBe(422);
      expect(r.body.issues?.[0]?.message ?? r.body.error, q).toMatch(msg);
    }
    const r = await call(users.dmc, two, "patients=10&responders=3");
    expect(r.status).toBe(422);
    expect(r.body.issues[0].message).toMatch(/patientsT is missing/);
    expect((await call(users.dmc, two, "patientsT=41&respondersT=0&patientsC=1&respondersC=0")).status).toBe(422);
  });

  it("writes nothing: every table's row count and the audit trail are unchanged after answers, refusals and bad input", async () => {
    const before = await rowCounts();
    const lastAudit = await db("audit_events").max({ id: "id" }).first();
    await call(users.dmc, single, "patients=10&responders=3");
    await call(users.statistician, two, "patientsT=20&respondersT=12&patientsC=20&respondersC=6");
    await call(users.sponsor, single, "patients=10&responders=3");
    await call(users.dmc, single, "patients=-4&responders=0");
    await call(users.dmc, single, "patients=99&responders=0");
    expect(await rowCounts()).toEqual(before);
    expect(await db("audit_events").max({ id: "id" }).first()).toEqual(lastAudit);
  });
});

describe("pending outcomes", () => {
  let stat: PublicUser;
  let trial: TrialRow;
  beforeAll(async () => {
    stat = (await db("users").where({ id: users.statistician }).first()) as PublicUser;
    trial = (await db("trials").where({ code: "CRN-201" }).first()) as TrialRow;
  });

  it("a typed pending count is stored, checked against enrolled, reaches the review, and leaves the predictive probability as if those patients were simply future ones", async () => {
    const look3 = await db("analyses").where({ trial_id: trial.id, look_number: 3 }).first();
    const arm = await db("arms").where({ trial_id: trial.id }).first();
    let rv = (await openLookForEntry(await enter(stat, trial.id), look3.id, { rowVersion: look3.row_version, cutoffDate: "2026-12-31" })).rowVersion;
    const counts = (pending: number | undefined, enrolled = 30) => [{ armId: arm.id, enrolled, treated: 29, evaluable: 26, responders: 8, toxicities: 4, ...(pending === undefined ? {} : { pending }) }];
    // Evaluable 26 + pending 5 > enrolled 30: refused, nothing written.
    const refused = await saveArmCounts(await enter(stat, trial.id), look3.id, { rowVersion: rv, cutoffDate: "2026-12-31", counts: counts(5) }).catch((e) => e);
    expect(refused instanceof ZodError || refused instanceof HttpError).toBe(true);
    expect(await db("analysis_arm_counts").where({ analysis_id: look3.id })).toHaveLength(0);
    rv = (await saveArmCounts(await enter(stat, trial.id), look3.id, { rowVersion: rv, cutoffDate: "2026-12-31", counts: counts(3) })).rowVersion;
    expect((await db("analysis_arm_counts").where({ analysis_id: look3.id }).first()).pending).toBe(3);
    await lockAnalysis(await enter({ ...stat }, trial.id), look3.id, { rowVersion: rv, password: "demo-stat-pass" });

    const { input } = await loadReviewInput(trial, look3.id, asClosedConnection(db));
    const review = computeReview(input);
    expect(review.arms[0]).toMatchObject({ responders: 8, evaluable: 26, pending: 3 });
    // By hand: the same look with the 3 pending patients not enrolled yet (future patients).
    const byHand = computeReview({ ...input, looks: input.looks.map((l) => (l.analysisId === look3.id ? { ...l, counts: l.counts.map((c) => ({ ...c, enrolled: c.enrolled - 3, pending: 0 })) } : l)) });
    expect(review.current.evaluation.predictiveProbability).toBe(byHand.current.evaluation.predictiveProbability);

    // The what-if says the pending patients are among the hypothetical ones.
    const r = await call(users.dmc, { trialId: trial.id, analysisId: look3.id }, "patients=14&responders=4");
    expect(r.status).toBe(200);
    expect(r.body.pending).toEqual({ single: 3 });
    expect(r.body.final).toBe(true);
  });

  it("the CSV's evaluable = pending rows are stored as pending and counted per arm", async () => {
    const ct = await db("trials").where({ code: "CRN-305" }).first();
    const look2 = await db("analyses").where({ trial_id: ct.id, look_number: 2 }).first();
    const rv = (await openLookForEntry(await enter(stat, ct.id), look2.id, { rowVersion: look2.row_version, cutoffDate: "2026-12-31" })).rowVersion;
    const lines = ["subject_id,arm,enrolment_date,evaluable,response,toxicity"];
    // Experimental: 21 evaluable (12 responders), 2 pending; control: 21 evaluable (6 responders), 1 pending.
    for (let i = 0; i < 21; i++) lines.push(`E-${i},experimental,2026-07-01,yes,${i < 12 ? "yes" : "no"},`);
    for (let i = 0; i < 2; i++) lines.push(`EP-${i},experimental,2026-12-01,pending,,`);
    for (let i = 0; i < 21; i++) lines.push(`C-${i},control,2026-07-01,yes,${i < 6 ? "yes" : "no"},`);
    lines.push("CP-0,control,2026-12-02,pending,,");
    const out = await confirmPatientUpload(await enter(stat, ct.id), look2.id, new TextEncoder().encode(lines.join("\n") + "\n"), { rowVersion: rv });
    expect(out.counts.map((c) => [c.evaluable, c.responders, c.pending])).toEqual([
      [21, 12, 2],
      [21, 6, 1],
    ]);
    const stored = await db("analysis_arm_counts").where({ analysis_id: look2.id }).orderBy("arm_id");
    expect(stored.map((c: { pending: number }) => c.pending)).toEqual([2, 1]);
    const flagged = await db("patient_outcomes").where({ analysis_id: look2.id, outcome_pending: 1 }).orderBy("subject_id").pluck("subject_id");
    expect(flagged).toEqual(["CP-0", "EP-0", "EP-1"]);
  });
});
