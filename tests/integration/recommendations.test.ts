/**
 * Recording the DMC's recommendation against the real database: e-signature bound to the record,
 * the analysis marked reviewed, exactly one audit row without the (closed) rationale, never edited
 * (a correction is a new linked entry), and nothing written when anything is wrong.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { asClosedConnection } from "@/db/knex";
import { ZodError } from "zod";
import { checkTrialAccess } from "@/lib/auth";
import { verifyAuditChain } from "@/db/audit";
import { HttpError, errorResponse } from "@/lib/http";
import { WriteNotSavedError } from "@/db/errors";
import { recordRecommendation } from "@/lib/review/record-recommendation";
import { fetchRecommendationsClosed } from "@/db/queries/recommendations";
import { fetchRecommendationsOpen } from "@/db/queries/open-status";
import { insertDesignVersion, markDesignLocked } from "@/db/queries/designs";
import { insertSignature, recordHash } from "@/db/queries/signatures";
import { createPlannedLooks } from "@/db/queries/analyses";
import { replaceArmCounts } from "@/db/queries/closed";
import type { PublicUser } from "@/db/types";
import { db, giveRole, killMidTransaction, makeTrial, makeUser, resetDatabase } from "./support/db";
import { smallSingleArmDesign } from "./support/designs";
import { lockAnalysis, reopenAnalysis } from "@/lib/analyses/service";
import { fetchAuditEvents } from "@/db/audit";
import { loadReproducibilityRecord } from "@/lib/review/load-review";
import { fetchTrial } from "@/db/queries/trials";
/** The statistician's access for the data-entry services (they re-check enterData themselves). */
const enter = (u: Parameters<typeof checkTrialAccess>[0], trialId: number) => checkTrialAccess(u, trialId, "enterData");

const DESIGN = smallSingleArmDesign();

let trialId: number;
let otherTrialId: number;
let dmc: PublicUser & { password: string };
let sponsor: PublicUser & { password: string };
let lockedLook: number;
let plannedLook: number;
let otherTrialLook: number;

async function setUpTrial(owner: PublicUser, lockFirst: boolean): Promise<{ id: number; looks: number[] }> {
  const id = await makeTrial();
  const looks = await db.transaction(async (tx) => {
    const design = await insertDesignVersion(tx, { trialId: id, spec: DESIGN, createdBy: null, amendmentReason: null });
    const sig = await insertSignature(tx, { userId: owner.id, signerName: owner.name, signerEmail: owner.email, meaning: "design approved", entityType: "design", entityId: design.id, record: DESIGN });
    await markDesignLocked(tx, design.id, sig.id);
    await createPlannedLooks(tx, id, design.id, [10, 20, 30]);
    const rows = await tx("analyses").where({ trial_id: id }).orderBy("look_number");
    if (lockFirst) {
      const arm = await tx("arms").where({ trial_id: id }).first();
      await replaceArmCounts(tx, rows[0].id, [{ armId: arm.id, enrolled: 10, treated: null, evaluable: 10, responders: 4, toxicities: null }]);
      await tx("analyses").where({ id: rows[0].id }).update({ status: "locked", cutoff_date: "2026-05-01", enrolled_total: 10, locked_at: new Date() });
    }
    return rows.map((r: { id: number }) => r.id);
  });
  return { id, looks };
}

async function counts() {
  const [r, s, a] = await Promise.all([db("recommendations").count({ n: "*" }).first(), db("signatures").count({ n: "*" }).first(), db("audit_events").count({ n: "*" }).first()]);
  return { recommendations: Number(r?.n), signatures: Number(s?.n), audit: Number(a?.n) };
}

async function statusOf(p: Promise<unknown>): Promise<number | "zod"> {
  try {
    await p;
    return 200;
  } catch (e) {
    if (e instanceof ZodError) return "zod";
    if (e instanceof HttpError) return e.status;
    throw e;
  }
}

beforeAll(async () => {
  await resetDatabase();
  dmc = await makeUser({ name: "Invented DMC member" });
  sponsor = await makeUser({ name: "Invented sponsor" });
  const t = await setUpTrial(dmc, true);
  trialId = t.id;
  lockedLook = t.looks[0];
  plannedLook = t.looks[1];
  const o = await setUpTrial(dmc, true);
  otherTrialId = o.id;
  otherTrialLook = o.looks[0];
  await giveRole(dmc.id, trialId, "dmc_member");
  await giveRole(dmc.id, otherTrialId, "dmc_member");
  await giveRole(sponsor.id, trialId, "sponsor");
});

const good = { decision: "continue", rationale: "Predictive probability comfortably above the futility threshold.", password: "" };

describe("recording a recommendation", () => {
  it("a sponsor may not record one (403), before any input is read", async () => {
    expect(await statusOf(checkTrialAccess(sponsor, trialId, "recordRecommendation"))).toBe(403);
  });

  it("a wrong password signs nothing and writes nothing but its open audit row (422)", async () => {
    const access = await checkTrialAccess(dmc, trialId, "recordRecommendation");
    const before = await counts();
    expect(await statusOf(recordRecommendation(access, lockedLook, { ...good, password: "wrong-password" }))).toBe(422);
    expect(await counts()).toEqual({ ...before, audit: before.audit + 1 });
    const last = await db("audit_events").orderBy("id", "desc").first();
    expect(last).toMatchObject({ action: "signature_password_failed", actor_user_id: dmc.id, visibility: "open" });
    expect(JSON.stringify(last)).not.toContain("wrong-password");
  });

  it("invalid input is refused by the schema and writes nothing", async () => {
    const access = await checkTrialAccess(dmc, trialId, "recordRecommendation");
    const before = await counts();
    expect(await statusOf(recordRecommendation(access, lockedLook, { decision: "pause", rationale: "", password: dmc.password }))).toBe("zod");
    expect(await counts()).toEqual(before);
  });

  it("a look that is not locked cannot be reviewed (409), and another trial's analysis is not found (404)", async () => {
    const access = await checkTrialAccess(dmc, trialId, "recordRecommendation");
    const before = await counts();
    expect(await statusOf(recordRecommendation(access, plannedLook, { ...good, password: dmc.password }))).toBe(409);
    expect(await statusOf(recordRecommendation(access, otherTrialLook, { ...good, password: dmc.password }))).toBe(404);
    expect(await counts()).toEqual(before);
  });

  it("a connection lost in the middle of recording leaves nothing behind: no signature, no recommendation, the look still locked (503)", async () => {
    const access = await checkTrialAccess(dmc, trialId, "recordRecommendation");
    const before = { ...(await counts()), look: await db("analyses").where({ id: lockedLook }).first() };
    let uncommitted = -1;
    const err = await killMidTransaction(
      () => recordRecommendation(access, lockedLook, { ...good, password: dmc.password }),
      async (owner) => {
        const peek = await owner.transaction(async (trx) => trx("recommendations").where({ analysis_id: lockedLook }).count({ n: "*" }).first(), { isolationLevel: "read uncommitted" });
        uncommitted = Number(peek?.n);
      },
    );
    // It had written its recommendation row when the connection went: the kill was mid-transaction.
    expect(uncommitted).toBe(1);
    expect(err, "the failure must reach the caller").toBeInstanceOf(WriteNotSavedError);
    expect((err as Error).message).toMatch(/nothing was saved/);
    expect(errorResponse(err).status, "answered as 503").toBe(503);
    expect({ ...(await counts()), look: await db("analyses").where({ id: lockedLook }).first() }).toEqual(before);
    expect((await verifyAuditChain(db)).ok).toBe(true);
  });

  it("records the recommendation with a signature bound to {analysisId, decision, rationale, correctsId}, marks the analysis reviewed and appends one open audit row without the rationale", async () => {
    const access = await checkTrialAccess(dmc, trialId, "recordRecommendation");
    const before = await counts();
    const rec = await recordRecommendation(access, lockedLook, { ...good, password: dmc.password });
    const after = await counts();
    expect(after).toEqual({ recommendations: before.recommendations + 1, signatures: before.signatures + 1, audit: before.audit + 1 });

    const sig = await db("signatures").where({ id: rec.signatureId }).first();
    expect(sig).toMatchObject({ user_id: dmc.id, signer_name: dmc.name, meaning: "recommendation recorded", entity_type: "analysis", entity_id: lockedLook });
    expect(sig.record_hash).toBe(recordHash({ analysisId: lockedLook, reviewVersion: 1, decision: "continue", rationale: good.rationale, correctsId: null }));

    const analysis = await db("analyses").where({ id: lockedLook }).first();
    expect(analysis.status).toBe("reviewed");
    expect(analysis.reviewed_at).not.toBeNull();

    const audit = await db("audit_events").orderBy("id", "desc").first();
    expect(audit).toMatchObject({ action: "recommendation_recorded", visibility: "open", trial_id: trialId, entity_type: "recommendation", entity_id: String(rec.id) });
    expect(audit.new_values).not.toContain("futility threshold");
    expect(audit.new_values).not.toContain("rationale");
  });

  it("a second first-recommendation is refused (409): recorded entries are never edited", async () => {
    const access = await checkTrialAccess(dmc, trialId, "recordRecommendation");
    const before = await counts();
    expect(await statusOf(recordRecommendation(access, lockedLook, { ...good, decision: "stop_futility", password: dmc.password }))).toBe(409);
    expect(await counts()).toEqual(before);
  });

  it("a correction is a new entry linked by corrects_id; the original stays unchanged, and it cannot be corrected twice", async () => {
    const access = await checkTrialAccess(dmc, trialId, "recordRecommendation");
    const [original] = await fetchRecommendationsClosed(trialId, lockedLook);
    const rawBefore = await db("recommendations").where({ id: original.id }).first();
    const fix = await recordRecommendation(access, lockedLook, { decision: "continue_modified", rationale: "Corrected: continue with the amended visit schedule.", correctsId: String(original.id), password: dmc.password });
    expect(fix.correctsId).toBe(original.id);
    expect(await db("recommendations").where({ id: original.id }).first()).toEqual(rawBefore);
    const list = await fetchRecommendationsClosed(trialId, lockedLook);
    expect(list.map((r) => [r.id, r.correctsId, r.correctedById])).toEqual([
      [fix.id, original.id, null],
      [original.id, null, fix.id],
    ]);
    expect(await statusOf(recordRecommendation(access, lockedLook, { ...good, correctsId: original.id, password: dmc.password }))).toBe(409);
    const audit = await db("audit_events").orderBy("id", "desc").first();
    expect(audit.action).toBe("recommendation_corrected");
  });

  it("the open query gives decision and date only: no rationale", async () => {
    const open = await fetchRecommendationsOpen(trialId);
    expect(open).toHaveLength(2);
    for (const r of open) {
      expect(Object.keys(r).sort()).toEqual(["analysisId", "correctsId", "decision", "id", "lookNumber", "recordedAt", "reviewVersion", "signerName", "superseded"]);
      expect(JSON.stringify(r)).not.toContain("amended visit schedule");
    }
  });
});

describe("correction after review (finding 6): reopening a reviewed look starts a new review version", () => {
  let stat: PublicUser & { password: string };
  const reason = "Site 4 reported two responders late; the cumulative counts at this cut-off were wrong.";
  beforeAll(async () => {
    stat = await makeUser({ name: "Invented statistician" });
    await giveRole(stat.id, trialId, "unblinded_statistician");
  });
  const lookRow = () => db("analyses").where({ id: lockedLook }).first();

  it("without a password, or with a wrong one, nothing is signed or written (422)", async () => {
    const look = await lookRow();
    expect(look.status).toBe("reviewed");
    const before = { ...(await counts()), look };
    expect(await statusOf(reopenAnalysis(await enter(stat, trialId), lockedLook, { rowVersion: look.row_version, reason }))).toBe(422);
    expect(await statusOf(reopenAnalysis(await enter(stat, trialId), lockedLook, { rowVersion: look.row_version, reason, password: "wrong-password" }))).toBe(422);
    expect(await statusOf(reopenAnalysis(await enter(stat, trialId), lockedLook, { rowVersion: look.row_version, reason: "short", password: stat.password }))).toBe("zod");
    // Nothing is signed or changed; only the wrong password is on record (an open audit row, no secret in it).
    expect({ ...(await counts()), look: await lookRow() }).toEqual({ ...before, audit: before.audit + 1 });
    const failed = await db("audit_events").orderBy("id", "desc").first();
    expect(failed).toMatchObject({ action: "signature_password_failed", visibility: "open", actor_user_id: stat.id });
    expect(`${failed.new_values}${failed.old_values}${failed.reason}`).not.toContain("wrong-password");
  });

  it("with a reason and the password: review version 2, a signature bound to the reopening, an open audit row without the reason and a closed one with it", async () => {
    const look = await lookRow();
    const auditBefore = (await counts()).audit;
    const out = await reopenAnalysis(await enter(stat, trialId), lockedLook, { rowVersion: look.row_version, reason, password: stat.password });
    expect(out).toMatchObject({ reviewVersion: 2, amendment: look.amendment_count + 1 });
    expect(await lookRow()).toMatchObject({ status: "open", review_version: 2, amendment_count: look.amendment_count + 1, lock_signature_id: null, reviewed_at: null });
    const sig = await db("signatures").where({ id: out.signatureId }).first();
    expect(sig).toMatchObject({ user_id: stat.id, meaning: "review reopened for correction", entity_type: "analysis", entity_id: lockedLook });
    expect(sig.record_hash).toBe(recordHash({ trialId, analysisId: lockedLook, lookNumber: 1, reviewVersion: 1, newReviewVersion: 2, amendment: look.amendment_count + 1, reason }));
    const rows = await db("audit_events").where("id", ">", 0).orderBy("id", "desc").limit(2);
    expect((await counts()).audit).toBe(auditBefore + 2);
    const [closedRow, openRow] = rows;
    expect(openRow).toMatchObject({ action: "review_reopened_for_correction", visibility: "open", reason: null });
    expect(`${openRow.new_values}${openRow.old_values}`).not.toContain("Site 4");
    expect(closedRow).toMatchObject({ action: "correction_reason_recorded", visibility: "closed", reason });
    // What a blinded role reads of the trail: the correction was opened, not why.
    const open = await fetchAuditEvents({ trialId, openOnly: true });
    expect(JSON.stringify(open)).not.toContain("Site 4");
    expect((await verifyAuditChain(db)).ok).toBe(true);
  });

  it("recommendations stay on review version 1 and are superseded, in the closed list and in the open status (without data)", async () => {
    const closed = await fetchRecommendationsClosed(trialId, lockedLook);
    expect(closed.length).toBeGreaterThan(0);
    for (const r of closed) expect(r).toMatchObject({ reviewVersion: 1, superseded: true });
    const open = (await fetchRecommendationsOpen(trialId)).filter((r) => r.analysisId === lockedLook);
    for (const r of open) expect(r).toMatchObject({ reviewVersion: 1, superseded: true });
  });

  it("after the corrected look is locked again, the DMC records a first recommendation on version 2; only that one is current, and the export names the versions and signatures", async () => {
    let look = await lookRow();
    await lockAnalysis(await enter(stat, trialId), lockedLook, { rowVersion: look.row_version, password: stat.password });
    const access = await checkTrialAccess(dmc, trialId, "recordRecommendation");
    const rec = await recordRecommendation(access, lockedLook, { ...good, decision: "continue_modified", password: dmc.password });
    expect(rec.correctsId).toBeNull();
    const list = await fetchRecommendationsClosed(trialId, lockedLook);
    expect(list.filter((r) => !r.superseded).map((r) => [r.id, r.reviewVersion])).toEqual([[rec.id, 2]]);
    look = await lookRow();
    expect(look).toMatchObject({ status: "reviewed", review_version: 2 });

    const trial = (await fetchTrial(trialId))!;
    const json = await loadReproducibilityRecord(trial, lockedLook, asClosedConnection(db));
    expect(json.provenance.reviewVersion).toBe(2);
    expect(json.provenance.designVersion).toMatchObject({ id: look.design_id, version: 1 });
    const lockSig = await db("signatures").where({ id: look.lock_signature_id }).first();
    expect(json.provenance.lockSignature).toMatchObject({ signatureId: lockSig.id, recordHash: lockSig.record_hash, meaning: "analysis locked" });
    const designSig = await db("designs as d").join("signatures as s", "s.id", "d.signature_id").where("d.id", look.design_id).first("s.id", "s.record_hash");
    expect(json.provenance.designSignature).toMatchObject({ signatureId: designSig.id, recordHash: designSig.record_hash });
    const recSig = await db("signatures").where({ id: rec.signatureId }).first();
    expect(json.provenance.recommendations.find((r) => r.id === rec.id)).toMatchObject({ reviewVersion: 2, superseded: false, signatureId: recSig.id, recordHash: recSig.record_hash });
    expect(json.outputs.arms[0].wilson.lower).toBeGreaterThan(0);
  });
});
