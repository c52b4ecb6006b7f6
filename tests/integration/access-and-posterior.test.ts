/**
 * The two single-round-trip reads on the busiest paths, against the real database:
 * requireTrialAccess (account, trial and roles in one query, on every request) and the interval
 * question's one-arm posterior (one query), which must agree with the full closed review.
 */
import { beforeAll, describe, expect, it, vi } from "vitest";
import { StatsDomainError } from "@/lib/stats/validate";
import { insertDesignVersion, markDesignLocked } from "@/db/queries/designs";
import { insertSignature } from "@/db/queries/signatures";
import { bumpSessionVersion } from "@/db/queries/users";
import { createPlannedLooks } from "@/db/queries/analyses";
import { replaceArmCounts } from "@/db/queries/closed";
import type { TwoArmDesign } from "@/lib/stats/types";
import type { TrialRow } from "@/db/types";
import { statusOf } from "./support/status";
import { db, giveRole, makeTrial, makeUser, resetDatabase } from "./support/db";
import { asClosedConnection } from "@/db/knex";

let signedIn: number | null = null;
/** The session version the mocked session token carries (fresh accounts start at 0). */
let signedInVersion = 0;
vi.mock("@/lib/auth/session", () => ({
  sessionUserId: vi.fn(async () => signedIn),
  sessionClaims: vi.fn(async () => (signedIn === null ? null : { userId: signedIn, sessionVersion: signedInVersion })),
}));

const { currentUser, requireTrialAccess } = await import("@/lib/auth");
const { loadArmPosterior, loadReviewInput } = await import("@/lib/review/load-review");
const { armPosterior } = await import("@/lib/review/compute-review");

// Different priors per arm, so a posterior built from the wrong arm's prior or counts shows.
const DESIGN: TwoArmDesign = {
  arms: "two",
  priorT: { family: "beta", a: 2, b: 3 },
  priorC: { family: "robustMixture", mean: 0.3, ess: 10, weight: 0.8 },
  controlRate: 0.3,
  experimentalRate: 0.5,
  delta: 0,
  nMaxPerArm: 30,
  looks: { kind: "list", sizes: [10, 20, 30] },
  rule: { kind: "posterior", thetaT: 0.95, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};


let trial: TrialRow;
let otherTrialId: number;
let arms: { id: number; arm_role: string }[];
let lockedLook: number;
let plannedLook: number;

beforeAll(async () => {
  await resetDatabase();
  const trialId = await makeTrial({ designType: "two" });
  otherTrialId = await makeTrial();
  const owner = await makeUser();
  await db.transaction(async (tx) => {
    const design = await insertDesignVersion(tx, { trialId, spec: DESIGN, createdBy: null, amendmentReason: null });
    const sig = await insertSignature(tx, { userId: owner.id, signerName: owner.name, signerEmail: owner.email, meaning: "design approved", entityType: "design", entityId: design.id, record: DESIGN });
    await markDesignLocked(tx, design.id, sig.id);
    await createPlannedLooks(tx, trialId, design.id, [10, 20, 30]);
    const looks = await tx("analyses").where({ trial_id: trialId }).orderBy("look_number");
    arms = await tx("arms").where({ trial_id: trialId }).orderBy("id");
    const byRole = (r: string) => arms.find((a) => a.arm_role === r)!.id;
    await replaceArmCounts(tx, looks[0].id, [
      { armId: byRole("experimental"), enrolled: 11, treated: null, evaluable: 10, responders: 6, toxicities: null },
      { armId: byRole("control"), enrolled: 10, treated: null, evaluable: 9, responders: 2, toxicities: null },
    ]);
    await tx("analyses").where({ id: looks[0].id }).update({ status: "locked", cutoff_date: "2026-05-01", enrolled_total: 21, locked_at: new Date() });
    lockedLook = looks[0].id;
    plannedLook = looks[1].id;
  });
  trial = (await db("trials").where({ id: trialId }).first()) as TrialRow;
});

describe("requireTrialAccess (one query per request)", () => {
  it("answers 401 without a session, and for a deactivated or deleted account", async () => {
    signedIn = null;
    expect(await statusOf(requireTrialAccess(trial.id, "viewOpen"))).toBe(401);
    const gone = await makeUser();
    await giveRole(gone.id, trial.id, "sponsor");
    signedIn = gone.id;
    expect(await statusOf(requireTrialAccess(trial.id, "viewOpen"))).toBe(200);
    await db("users").where({ id: gone.id }).update({ is_active: false });
    expect(await statusOf(requireTrialAccess(trial.id, "viewOpen"))).toBe(401);
    signedIn = 987_654_321;
    expect(await statusOf(requireTrialAccess(trial.id, "viewOpen"))).toBe(401);
  });

  it("a copied session token is refused once the account's session version has moved on (sign-out, new password, deactivation)", async () => {
    const u = await makeUser();
    await giveRole(u.id, trial.id, "sponsor");
    signedIn = u.id;
    signedInVersion = 0;
    expect(await statusOf(requireTrialAccess(trial.id, "viewOpen"))).toBe(200);
    await db.transaction((tx) => bumpSessionVersion(tx, u.id));
    expect(await statusOf(requireTrialAccess(trial.id, "viewOpen"))).toBe(401);
    expect(await currentUser()).toBeNull();
    // A token issued after the bump carries the new version and works.
    signedInVersion = 1;
    expect(await statusOf(requireTrialAccess(trial.id, "viewOpen"))).toBe(200);
    expect((await currentUser())?.id).toBe(u.id);
    signedInVersion = 0;
  });

  it("collects every role held on the trial, and only on that trial", async () => {
    const u = await makeUser();
    await giveRole(u.id, trial.id, "dmc_member");
    await giveRole(u.id, trial.id, "coordinator");
    await giveRole(u.id, otherTrialId, "unblinded_statistician");
    signedIn = u.id;
    const access = await requireTrialAccess(trial.id, "recordRecommendation");
    expect([...access.roles].sort()).toEqual(["coordinator", "dmc_member"]);
    expect(access.trial.id).toBe(trial.id);
    expect(access.trial.code).toBe(trial.code);
    expect(access.user).toMatchObject({ id: u.id, isActive: true, isAdmin: false });
    // Capabilities are the union of the roles: managing meetings comes from the coordinator role.
    expect(await statusOf(requireTrialAccess(trial.id, "manageMeetings"))).toBe(200);
    expect(await statusOf(requireTrialAccess(trial.id, "enterData"))).toBe(403);
  });

  it("answers 404 for a malformed or missing trial id, and for an administrator only where the trial exists", async () => {
    const admin = await makeUser({ isAdmin: true });
    signedIn = admin.id;
    for (const id of [Number.NaN, -1, 0, 1.5, 999_999]) expect(await statusOf(requireTrialAccess(id, "viewOpen"))).toBe(404);
    const access = await requireTrialAccess(trial.id, "viewOpen");
    expect(access.roles).toEqual([]);
    expect(access.principal.isAdmin).toBe(true);
  });
});

describe("loadArmPosterior (the interval question's single query)", () => {
  it("gives, for each arm, exactly the posterior the full closed review builds", async () => {
    const full = await loadReviewInput(trial, lockedLook, asClosedConnection(db));
    const look = full.input.looks.find((l) => l.analysisId === lockedLook)!;
    for (const arm of arms) {
      const narrow = await loadArmPosterior(trial, lockedLook, arm.id, asClosedConnection(db));
      expect(narrow).toEqual(armPosterior(full.input.design, full.input.arms, look, arm.id));
    }
    // And the two arms differ (different priors and counts), so a swap would not pass unseen.
    expect(await loadArmPosterior(trial, lockedLook, arms[0].id, asClosedConnection(db))).not.toEqual(await loadArmPosterior(trial, lockedLook, arms[1].id, asClosedConnection(db)));
  });

  it("refuses a look that is not locked (409), another trial's look (404) and another trial's arm (domain error)", async () => {
    expect(await statusOf(loadArmPosterior(trial, plannedLook, arms[0].id, asClosedConnection(db)))).toBe(409);
    const designId = (await db("designs").where({ trial_id: trial.id }).first()).id;
    const [otherLook] = await db("analyses").insert({ trial_id: otherTrialId, design_id: designId, look_number: 1, planned_n: 10, status: "locked" });
    expect(await statusOf(loadArmPosterior(trial, otherLook, arms[0].id, asClosedConnection(db)))).toBe(404);
    expect(await statusOf(loadArmPosterior(trial, 999_999, arms[0].id, asClosedConnection(db)))).toBe(404);
    const otherArm = (await db("arms").where({ trial_id: otherTrialId }).first()).id;
    await expect(loadArmPosterior(trial, lockedLook, otherArm, asClosedConnection(db))).rejects.toBeInstanceOf(StatsDomainError);
  });
});
