/**
 * The design studio's writes against the real database: drafts, optimistic concurrency, lock with
 * an e-signature, amendments, and exactly one audit row per write (none for a refused write).
 */
import { beforeAll, beforeEach, describe, expect, it } from "vitest";
import { asClosedConnection } from "@/db/knex";
import { checkTrialAccess, type TrialAccess } from "@/lib/auth";
import { HttpError } from "@/lib/http";
import { verifyAuditChain } from "@/db/audit";
import { recordHash } from "@/db/queries/signatures";
import { amendDesign, createDraftDesign, createTrial, designSignedRecord, lockDesign, updateDraftDesign } from "@/lib/design/service";
import { defaultDesign } from "@/lib/design/form-model";
import { expandLooks } from "@/lib/stats/looks";
import type { SingleArmDesign } from "@/lib/stats/types";
import { statusOf } from "./support/status";
import { giveRole, makeTrial, makeUser, resetDatabase, db } from "./support/db";
import { replaceArmCounts } from "@/db/queries/closed";
import { loadReviewInput } from "@/lib/review/load-review";
import { fetchTrial } from "@/db/queries/trials";

type User = Awaited<ReturnType<typeof makeUser>>;
let stat: User;
let stat2: User;
let admin: User;
let sponsor: User;

async function auditCount(): Promise<number> {
  const r = await db("audit_events").count({ n: "*" }).first();
  return Number(r?.n ?? 0);
}
async function counts() {
  const [d, s, a, e] = await Promise.all(
    ["designs", "signatures", "analyses", "audit_events"].map(async (t) => Number((await db(t).count({ n: "*" }).first())?.n ?? 0)),
  );
  return { designs: d, signatures: s, analyses: a, audit: e };
}

const design: SingleArmDesign = { ...(defaultDesign("single") as SingleArmDesign), looks: { kind: "list", sizes: [10, 20, 30] }, nMax: 40 };

beforeAll(async () => {
  await resetDatabase();
  stat = await makeUser({ name: "Stat One" });
  stat2 = await makeUser({ name: "Stat Two" });
  admin = await makeUser({ isAdmin: true });
  sponsor = await makeUser();
});

let trialId: number;
let access: TrialAccess;
let access2: TrialAccess;
beforeEach(async () => {
  trialId = await makeTrial();
  await giveRole(stat.id, trialId, "unblinded_statistician");
  await giveRole(stat2.id, trialId, "unblinded_statistician");
  await giveRole(sponsor.id, trialId, "sponsor");
  access = await checkTrialAccess(stat, trialId, "editDesign");
  access2 = await checkTrialAccess(stat2, trialId, "editDesign");
});

describe("drafts", () => {
  it("creating a draft writes version 1 and exactly one open audit row", async () => {
    const before = await auditCount();
    const d = await createDraftDesign(access, design);
    expect(d.version).toBe(1);
    expect(d.status).toBe("draft");
    expect(d.spec).toEqual(design);
    expect(await auditCount()).toBe(before + 1);
    const row = await db("audit_events").orderBy("id", "desc").first();
    expect(row).toMatchObject({ action: "design_draft_created", entity_type: "design", entity_id: String(d.id), visibility: "open", trial_id: trialId, actor_user_id: stat.id });
  });

  it("a second draft while one exists is a 409 and writes nothing", async () => {
    await createDraftDesign(access, design);
    const before = await counts();
    expect(await statusOf(createDraftDesign(access, design))).toBe(409);
    expect(await counts()).toEqual(before);
  });

  it("two statisticians saving the same revision: the first wins, the second gets a 409 and nothing of theirs is written", async () => {
    const d = await createDraftDesign(access, design);
    const mine = { ...design, p1: 0.45 };
    const theirs = { ...design, p1: 0.5 };
    const before = await auditCount();
    const saved = await updateDraftDesign(access, d.id, d.row_version, mine);
    expect(saved.row_version).toBe(d.row_version + 1);
    let conflictMessage = "";
    try {
      await updateDraftDesign(access2, d.id, d.row_version, theirs);
    } catch (e) {
      expect(e).toBeInstanceOf(HttpError);
      expect((e as HttpError).status).toBe(409);
      conflictMessage = (e as HttpError).message;
    }
    expect(conflictMessage).toMatch(/Someone else saved this draft/);
    const stored = await db("designs").where({ id: d.id }).first();
    expect(JSON.parse(stored.spec).p1).toBe(0.45);
    expect(await auditCount()).toBe(before + 1);
  });

  it("truly concurrent saves of one revision: exactly one succeeds", async () => {
    const d = await createDraftDesign(access, design);
    const results = await Promise.allSettled([
      updateDraftDesign(access, d.id, d.row_version, { ...design, p1: 0.41 }),
      updateDraftDesign(access2, d.id, d.row_version, { ...design, p1: 0.42 }),
    ]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const rejected = results.find((r) => r.status === "rejected") as PromiseRejectedResult;
    expect((rejected.reason as HttpError).status).toBe(409);
  });

  it("bad input (invalid design, wrong arm count) is a 422 and writes nothing", async () => {
    const d = await createDraftDesign(access, design);
    const before = await counts();
    expect(await statusOf(updateDraftDesign(access, d.id, d.row_version, { ...design, p0: 2 }))).toBe(422);
    expect(await statusOf(updateDraftDesign(access, d.id, d.row_version, defaultDesign("two")))).toBe(422);
    expect(await statusOf(updateDraftDesign(access, d.id, d.row_version, { ...design, looks: { kind: "list", sizes: [10, 99] } }))).toBe(422);
    expect(await counts()).toEqual(before);
    expect((await db("designs").where({ id: d.id }).first()).row_version).toBe(d.row_version);
  });

  it("a design of another trial is a 404 here", async () => {
    const other = await makeTrial();
    await giveRole(stat.id, other, "unblinded_statistician");
    const otherAccess = await checkTrialAccess(stat, other, "editDesign");
    const d = await createDraftDesign(otherAccess, design);
    expect(await statusOf(updateDraftDesign(access, d.id, d.row_version, design))).toBe(404);
  });
});

describe("lock with an electronic signature", () => {
  it("a wrong password is a 422 and writes nothing but the failed attempt's open audit row", async () => {
    const d = await createDraftDesign(access, design);
    const before = await counts();
    expect(await statusOf(lockDesign(access, d.id, d.row_version, "not-the-password"))).toBe(422);
    // An empty password is refused by the schema before any check: no audit row.
    expect(await statusOf(lockDesign(access, d.id, d.row_version, ""))).toBe(422);
    expect(await counts()).toEqual({ ...before, audit: before.audit + 1 });
    expect(await db("audit_events").orderBy("id", "desc").first()).toMatchObject({ action: "signature_password_failed", visibility: "open" });
  });

  it("locking writes the signature bound to the version, the planned looks and exactly one audit row", async () => {
    const d = await createDraftDesign(access, design);
    const before = await counts();
    const locked = await lockDesign(access, d.id, d.row_version, stat.password);
    expect(locked.status).toBe("locked");
    expect(locked.signature_id).not.toBeNull();
    const sig = await db("signatures").where({ id: locked.signature_id }).first();
    expect(sig).toMatchObject({ user_id: stat.id, signer_name: "Stat One", meaning: "design approved", entity_type: "design", entity_id: d.id });
    // The hash is of {trialId, version, spec}: recomputed independently here from the stored row.
    const stored = await db("designs").where({ id: d.id }).first();
    expect(sig.record_hash).toBe(recordHash(designSignedRecord(trialId, stored.version, JSON.parse(stored.spec))));
    expect(sig.record_hash).not.toBe(recordHash(designSignedRecord(trialId, stored.version, { ...design, p1: 0.41 })));
    const analyses = await db("analyses").where({ trial_id: trialId }).orderBy("look_number");
    expect(analyses.map((a: { planned_n: number }) => a.planned_n)).toEqual(expandLooks(design.looks, design.nMax));
    expect(analyses.map((a: { planned_n: number }) => a.planned_n)).toEqual([10, 20, 30, 40]);
    expect(analyses.every((a: { status: string; design_id: number }) => a.status === "planned" && a.design_id === d.id)).toBe(true);
    const after = await counts();
    expect(after.audit).toBe(before.audit + 1);
    expect(after.signatures).toBe(before.signatures + 1);
    const row = await db("audit_events").orderBy("id", "desc").first();
    expect(row).toMatchObject({ action: "design_locked", visibility: "open", entity_id: String(d.id) });
    expect(JSON.parse(row.new_values)).toMatchObject({ meaning: "design approved", signer: "Stat One", plannedLooks: [10, 20, 30, 40] });
    expect((await verifyAuditChain()).ok).toBe(true);
  });

  it("a locked design cannot be edited or locked again (409, nothing written)", async () => {
    const d = await createDraftDesign(access, design);
    const locked = await lockDesign(access, d.id, d.row_version, stat.password);
    const before = await counts();
    expect(await statusOf(updateDraftDesign(access, d.id, locked.row_version, { ...design, p1: 0.5 }))).toBe(409);
    expect(await statusOf(lockDesign(access, d.id, locked.row_version, stat.password))).toBe(409);
    expect(await statusOf(createDraftDesign(access, design))).toBe(409);
    expect(await counts()).toEqual(before);
  });

  it("locking a stale revision is a 409", async () => {
    const d = await createDraftDesign(access, design);
    await updateDraftDesign(access2, d.id, d.row_version, { ...design, p1: 0.45 });
    expect(await statusOf(lockDesign(access, d.id, d.row_version, stat.password))).toBe(409);
  });

  it("an administrator may edit but not lock; a sponsor may do neither", async () => {
    await giveRole(stat.id, trialId, "dmc_member");
    const adminAccess = await checkTrialAccess(admin, trialId, "editDesign");
    const d = await createDraftDesign(adminAccess, design);
    expect(await statusOf(lockDesign(adminAccess, d.id, d.row_version, admin.password))).toBe(403);
    expect(await statusOf(checkTrialAccess(sponsor, trialId, "editDesign"))).toBe(403);
    const sponsorView = await checkTrialAccess(sponsor, trialId, "viewOpen");
    expect(await statusOf(updateDraftDesign(sponsorView, d.id, d.row_version, design))).toBe(403);
  });
});

describe("amendments", () => {
  it("needs the locked version, keeps earlier versions readable, and the new lock supersedes the old", async () => {
    const d = await createDraftDesign(access, design);
    await lockDesign(access, d.id, d.row_version, stat.password);
    const draft1 = await createDraftDesign(access, design).catch((e) => e);
    expect((draft1 as HttpError).status).toBe(409);

    const before = await auditCount();
    const amendment = await amendDesign(access, d.id, "Add a look at 25 patients at the DMC's request");
    expect(await auditCount()).toBe(before + 1);
    expect(amendment).toMatchObject({ version: 2, status: "draft", amendment_reason: "Add a look at 25 patients at the DMC's request" });
    const row = await db("audit_events").orderBy("id", "desc").first();
    expect(row).toMatchObject({ action: "design_amendment_started", reason: "Add a look at 25 patients at the DMC's request" });
    // Only one draft at a time.
    expect(await statusOf(amendDesign(access, d.id, "Second amendment at once"))).toBe(409);
    // A draft cannot be amended.
    expect(await statusOf(amendDesign(access, amendment.id, "Amend a draft"))).toBe(409);

    const changed: SingleArmDesign = { ...design, looks: { kind: "list", sizes: [10, 20, 25, 30] } };
    const saved = await updateDraftDesign(access, amendment.id, amendment.row_version, changed);
    await lockDesign(access, amendment.id, saved.row_version, stat.password);
    const versions = await db("designs").where({ trial_id: trialId }).orderBy("version");
    expect(versions.map((v: { status: string }) => v.status)).toEqual(["superseded", "locked"]);
    expect(JSON.parse(versions[0].spec)).toEqual(design);
    const looks = await db("analyses").where({ trial_id: trialId }).orderBy("planned_n");
    expect(looks.map((a: { planned_n: number }) => a.planned_n)).toEqual([10, 20, 25, 30, 40]);
    expect((await verifyAuditChain()).ok).toBe(true);
  });

  it("amendments move open looks (finding 5): a look holding counts but not locked follows the new locked design, a locked look keeps its design, the audit row records the move and the review names its design version", async () => {
    const d = await createDraftDesign(access, design);
    await lockDesign(access, d.id, d.row_version, stat.password);
    const [l1, l2] = await db("analyses").where({ trial_id: trialId }).orderBy("look_number");
    const arm = await db("arms").where({ trial_id: trialId }).first();
    // Look 1 locked under version 1; look 2 open for entry with counts already saved.
    await replaceArmCounts(db as never, l1.id, [{ armId: arm.id, enrolled: 11, treated: 11, evaluable: 10, responders: 4, toxicities: 0 }]);
    await db("analyses").where({ id: l1.id }).update({ status: "locked", cutoff_date: "2026-03-01", enrolled_total: 11, locked_at: new Date() });
    await replaceArmCounts(db as never, l2.id, [{ armId: arm.id, enrolled: 22, treated: 22, evaluable: 21, responders: 7, toxicities: 1 }]);
    await db("analyses").where({ id: l2.id }).update({ status: "open", cutoff_date: "2026-05-01", enrolled_total: 22 });

    const amendment = await amendDesign(access, d.id, "Stricter futility threshold agreed with the DMC");
    const changed: SingleArmDesign = { ...design, rule: { ...design.rule, futilityThreshold: 0.1 } };
    const saved = await updateDraftDesign(access, amendment.id, amendment.row_version, changed);
    await lockDesign(access, amendment.id, saved.row_version, stat.password);

    const after = await db("analyses").where({ trial_id: trialId }).orderBy("look_number");
    expect(after.find((a: { id: number }) => a.id === l1.id).design_id).toBe(d.id);
    expect(after.find((a: { id: number }) => a.id === l2.id)).toMatchObject({ design_id: amendment.id, status: "open", planned_n: 20 });
    expect(after.filter((a: { status: string }) => a.status === "planned").every((a: { design_id: number }) => a.design_id === amendment.id)).toBe(true);
    const row = await db("audit_events").where({ action: "design_locked" }).orderBy("id", "desc").first();
    expect(JSON.parse(row.new_values).movedLooks).toEqual([
      { analysisId: l2.id, lookNumber: 2, status: "open", fromDesignId: d.id, toDesignId: amendment.id, fromPlannedN: 20, plannedN: 20 },
    ]);

    // Look 2 locked now: reviewed under version 2 (the new futility threshold); look 1 still under version 1.
    await db("analyses").where({ id: l2.id }).update({ status: "locked", locked_at: new Date() });
    const trial = (await fetchTrial(trialId))!;
    const r2 = await loadReviewInput(trial, l2.id, asClosedConnection(db));
    expect(r2.designVersion).toMatchObject({ id: amendment.id, version: 2 });
    expect(r2.input.design.rule.futilityThreshold).toBe(0.1);
    const r1 = await loadReviewInput(trial, l1.id, asClosedConnection(db));
    expect(r1.designVersion).toMatchObject({ id: d.id, version: 1, status: "superseded" });
    expect((await verifyAuditChain()).ok).toBe(true);
  });

  it("an amendment without a reason is a 422 and writes nothing", async () => {
    const d = await createDraftDesign(access, design);
    await lockDesign(access, d.id, d.row_version, stat.password);
    const before = await counts();
    for (const reason of ["", "   ", undefined, null, 42]) expect(await statusOf(amendDesign(access, d.id, reason))).toBe(422);
    expect(await counts()).toEqual(before);
  });
});

describe("create a trial", () => {
  const input = {
    code: "NEW-1",
    title: "An invented study",
    sponsorName: "Invented sponsor",
    phase: "II" as const,
    designType: "two" as const,
    endpointName: "Response",
    toxicityEndpointName: null,
    targetEnrolment: 80,
    armLabel: null,
    experimentalArmLabel: "E",
    controlArmLabel: "C",
  };

  it("a statistician creates a trial, becomes its unblinded statistician, one audit row", async () => {
    const before = await auditCount();
    const r = await createTrial(stat, input);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(await auditCount()).toBe(before + 1);
    const roles = await db("trial_memberships").where({ trial_id: r.trialId }).select("user_id", "role");
    expect(roles).toEqual([{ user_id: stat.id, role: "unblinded_statistician" }]);
    const arms = await db("arms").where({ trial_id: r.trialId }).orderBy("sort_order");
    expect(arms.map((a: { label: string; arm_role: string }) => [a.label, a.arm_role])).toEqual([["E", "experimental"], ["C", "control"]]);
    // A duplicate code is a field error and writes nothing.
    const again = await createTrial(stat, input);
    expect(again).toEqual({ ok: false, fieldErrors: { code: ["A trial with this code already exists."] } });
    expect(await auditCount()).toBe(before + 1);
  });

  it("an administrator who is not a statistician anywhere gets no role; someone with neither right gets 403", async () => {
    const lonelyAdmin = await makeUser({ isAdmin: true });
    const r = await createTrial(lonelyAdmin, { ...input, code: "NEW-2" });
    expect(r.ok).toBe(true);
    if (r.ok) expect(await db("trial_memberships").where({ trial_id: r.trialId })).toHaveLength(0);
    const before = await counts();
    expect(await statusOf(createTrial(sponsor, { ...input, code: "NEW-3" }))).toBe(403);
    expect(await counts()).toEqual(before);
  });
});
