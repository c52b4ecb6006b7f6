/**
 * The kept closed review (review_cache) against the real database: the lock route writes the row
 * (computed after the lock committed), the page's loader serves exactly what a direct computation
 * gives, the blinded database account cannot read the table, and a corrected look never gets the
 * old review back.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { actAs, currentClaims, currentSession, jsonRequest, routeContext } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));

import { asClosedConnection, blindDb } from "@/db/knex";
import { db, giveRole, makeTrial, makeUser, resetDatabase } from "./support/db";
import { insertDesignVersion, markDesignLocked } from "@/db/queries/designs";
import { insertSignature } from "@/db/queries/signatures";
import { createPlannedLooks } from "@/db/queries/analyses";
import { openLookForEntry, reopenAnalysis, saveArmCounts } from "@/lib/analyses/service";
import { computeReview } from "@/lib/review/compute-review";
import { loadReview, loadReviewInput } from "@/lib/review/load-review";
import { pendingReviewWarmUp, reviewInputSha256 } from "@/lib/review/review-cache";
import { reviewFromJson } from "@/lib/review/review-json";
import { ENGINE_VERSION } from "@/lib/stats/version";
import { expandLooks } from "@/lib/stats/looks";
import type { TwoArmDesign } from "@/lib/stats/types";
import type { PublicUser, TrialRow } from "@/db/types";
import * as lockRoute from "@/app/api/trials/[trialId]/analyses/[analysisId]/lock/route";
import { checkTrialAccess } from "@/lib/auth";
/** The statistician's access for the data-entry services (they re-check enterData themselves). */
const enter = (u: Parameters<typeof checkTrialAccess>[0], trialId: number) => checkTrialAccess(u, trialId, "enterData");

// An invented two-arm study: 40 per arm, looks at 20 and 40 per arm, predictive rule with safety.
const DESIGN: TwoArmDesign = {
  arms: "two",
  priorT: { family: "uniform" },
  priorC: { family: "jeffreys" },
  controlRate: 0.3,
  experimentalRate: 0.5,
  delta: 0,
  nMaxPerArm: 40,
  looks: { kind: "list", sizes: [20, 40] },
  rule: { kind: "predictive", thetaT: 0.95, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: { kind: "fixedLimit", qmax: 0.3, prior: { family: "beta", a: 0.5, b: 1.5 }, thetaS: 0.9 },
};

let stat: PublicUser & { password: string };
let trialId: number;
let lookId: number;
let arms: { id: number; arm_role: string }[];

const trialRow = async (): Promise<TrialRow> => db("trials").where({ id: trialId }).first();
const look = async (id: number) => db("analyses").where({ id }).first();
const cacheRows = async (analysisId: number) => db("review_cache").where({ analysis_id: analysisId }).orderBy("id");

function counts(respondersT: number, respondersC: number) {
  return arms.map((a) => ({
    armId: a.id,
    enrolled: 20,
    treated: 20,
    evaluable: 20,
    responders: a.arm_role === "experimental" ? respondersT : respondersC,
    toxicities: a.arm_role === "experimental" ? 3 : 2,
  }));
}

async function lockThroughRoute(id: number) {
  const res = await lockRoute.POST(jsonRequest("/x", "POST", { rowVersion: (await look(id)).row_version, password: stat.password }), routeContext({ trialId: String(trialId), analysisId: String(id) }));
  expect(res.status).toBe(200);
  // The route keeps the review in the background once the lock has committed; wait for it here.
  await pendingReviewWarmUp(id);
}

beforeAll(async () => {
  await resetDatabase();
  stat = await makeUser();
  trialId = await makeTrial({ designType: "two" });
  await giveRole(stat.id, trialId, "unblinded_statistician");
  await db.transaction(async (tx) => {
    const d = await insertDesignVersion(tx, { trialId, spec: DESIGN, createdBy: stat.id, amendmentReason: null });
    const sig = await insertSignature(tx, { userId: stat.id, signerName: stat.name, signerEmail: stat.email, meaning: "design approved", entityType: "design", entityId: d.id, record: DESIGN });
    await markDesignLocked(tx, d.id, sig.id);
    await createPlannedLooks(tx, trialId, d.id, expandLooks(DESIGN.looks, DESIGN.nMaxPerArm));
  });
  arms = await db("arms").where({ trial_id: trialId }).orderBy("sort_order");
  lookId = (await db("analyses").where({ trial_id: trialId }).orderBy("look_number").first()).id;
  actAs(stat.id);
  await openLookForEntry(await enter(stat, trialId), lookId, { rowVersion: (await look(lookId)).row_version, cutoffDate: "2026-11-20" });
  await saveArmCounts(await enter(stat, trialId), lookId, { rowVersion: (await look(lookId)).row_version, cutoffDate: "2026-11-20", counts: counts(11, 6) });
});

afterAll(async () => {
  await blindDb.destroy();
  await db.destroy();
});

describe("review_cache: a locked look's closed review computed once and kept", () => {
  it("locking the look writes one row under its review version, the engine version and the hash of its inputs", async () => {
    expect(await cacheRows(lookId)).toHaveLength(0);
    await lockThroughRoute(lookId);
    const rows = await cacheRows(lookId);
    expect(rows).toHaveLength(1);
    const ctx = await loadReviewInput(await trialRow(), lookId, asClosedConnection(db));
    expect(rows[0]).toMatchObject({ review_version: ctx.analysis.review_version, engine_version: ENGINE_VERSION, input_sha256: reviewInputSha256(ctx.input) });
  });

  it("the kept review is the review a direct computation gives, and reading it adds no row", async () => {
    const ctx = await loadReviewInput(await trialRow(), lookId, asClosedConnection(db));
    const direct = computeReview(ctx.input);
    const [row] = await cacheRows(lookId);
    expect(reviewFromJson(row.review_json)).toEqual(direct);
    const { review } = await loadReview(await trialRow(), lookId, asClosedConnection(db));
    expect(review).toEqual(direct);
    expect(review.arms.find((a) => a.role === "experimental")).toMatchObject({ responders: 11, evaluable: 20 });
    expect(await cacheRows(lookId)).toHaveLength(1);
  });

  it("a row that is missing is computed and kept on the first read", async () => {
    await db("review_cache").where({ analysis_id: lookId }).delete();
    const { review } = await loadReview(await trialRow(), lookId, asClosedConnection(db));
    const rows = await cacheRows(lookId);
    expect(rows).toHaveLength(1);
    expect(reviewFromJson(rows[0].review_json)).toEqual(review);
  });

  it("the blinded database account cannot read the table, not even one column", async () => {
    await expect(blindDb("review_cache").select("*").limit(1)).rejects.toThrow(/denied/i);
    await expect(blindDb("review_cache").select("analysis_id").limit(1)).rejects.toThrow(/denied/i);
    await expect(blindDb("review_cache").count({ n: "*" })).rejects.toThrow(/denied/i);
  });

  it("after a correction the old review is never served: reopening drops it, the relock keeps the corrected one", async () => {
    const [before] = await cacheRows(lookId);
    await reopenAnalysis(await enter(stat, trialId), lookId, { rowVersion: (await look(lookId)).row_version, reason: "Two responses in the experimental arm were entered twice." });
    expect(await cacheRows(lookId)).toHaveLength(0);
    await saveArmCounts(await enter(stat, trialId), lookId, { rowVersion: (await look(lookId)).row_version, cutoffDate: "2026-11-20", counts: counts(9, 6) });
    await lockThroughRoute(lookId);
    const rows = await cacheRows(lookId);
    expect(rows).toHaveLength(1);
    expect(rows[0].input_sha256).not.toBe(before.input_sha256);
    const { review } = await loadReview(await trialRow(), lookId, asClosedConnection(db));
    expect(review.arms.find((a) => a.role === "experimental")).toMatchObject({ responders: 9 });
    expect(review).toEqual(computeReview((await loadReviewInput(await trialRow(), lookId, asClosedConnection(db))).input));
  });

  it("a stale row left under the same look and review version (old input hash) is ignored, not served", async () => {
    const ctx = await loadReviewInput(await trialRow(), lookId, asClosedConnection(db));
    const stale = computeReview({ ...ctx.input, looks: ctx.input.looks.map((l) => ({ ...l, counts: l.counts.map((c) => ({ ...c, responders: 0 })) })) });
    await db("review_cache").where({ analysis_id: lookId }).delete();
    await db("review_cache").insert({ analysis_id: lookId, review_version: ctx.analysis.review_version, engine_version: ENGINE_VERSION, input_sha256: "0".repeat(64), review_json: JSON.stringify(stale), created_at: new Date() });
    const { review } = await loadReview(await trialRow(), lookId, asClosedConnection(db));
    expect(review.arms.find((a) => a.role === "experimental")).toMatchObject({ responders: 9 });
    expect(await cacheRows(lookId)).toHaveLength(2);
  });
});
