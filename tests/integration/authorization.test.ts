/**
 * lib/auth against the real database: for every role (and none, and administrator), which
 * capabilities a user has on a trial, and that a user not on the trial gets 404, not 403.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { checkTrialAccess } from "@/lib/auth";
import type { Capability } from "@/lib/auth/permissions";
import { statusOf as callStatus } from "./support/status";
import { giveRole, makeTrial, makeUser, resetDatabase, db } from "./support/db";
import type { PublicUser, TrialRole } from "@/db/types";

const CAPS: Capability[] = ["viewOpen", "viewClosed", "editDesign", "lockDesign", "enterData", "recordRecommendation", "manageMeetings", "viewAuditOpen", "viewAuditClosed"];

// The product brief's permission table, restated here independently of lib/auth/permissions.ts.
const EXPECTED: Record<TrialRole | "admin", Capability[]> = {
  admin: ["viewOpen", "editDesign", "viewAuditOpen"],
  unblinded_statistician: ["viewOpen", "viewClosed", "editDesign", "lockDesign", "enterData", "manageMeetings", "viewAuditOpen", "viewAuditClosed"],
  dmc_member: ["viewOpen", "viewClosed", "recordRecommendation", "viewAuditOpen", "viewAuditClosed"],
  sponsor: ["viewOpen", "viewAuditOpen"],
  coordinator: ["viewOpen", "manageMeetings", "viewAuditOpen"],
};

const statusOf = (user: PublicUser, trialId: number, cap: Capability) => callStatus(checkTrialAccess(user, trialId, cap));

let trialId: number;
let otherTrialId: number;
const users: Partial<Record<TrialRole | "admin" | "outsider", PublicUser>> = {};

beforeAll(async () => {
  await resetDatabase();
  trialId = await makeTrial();
  otherTrialId = await makeTrial();
  users.admin = await makeUser({ isAdmin: true });
  users.outsider = await makeUser();
  for (const role of ["unblinded_statistician", "dmc_member", "sponsor", "coordinator"] as TrialRole[]) {
    users[role] = await makeUser();
    await giveRole(users[role]!.id, trialId, role);
  }
  // The statistician is only a sponsor on the other trial: roles are per trial.
  await giveRole(users.unblinded_statistician!.id, otherTrialId, "sponsor");
});

describe("checkTrialAccess for every role and capability", () => {
  for (const role of ["admin", "unblinded_statistician", "dmc_member", "sponsor", "coordinator"] as const) {
    for (const cap of CAPS) {
      const allowed = EXPECTED[role].includes(cap);
      it(`${role} ${allowed ? "may" : "may not"} ${cap}`, async () => {
        expect(await statusOf(users[role]!, trialId, cap)).toBe(allowed ? 200 : 403);
      });
    }
  }

  it("a user with no role on the trial gets 404 for every capability (the trial's existence is not revealed)", async () => {
    for (const cap of CAPS) expect(await statusOf(users.outsider!, trialId, cap)).toBe(404);
  });

  it("a trial that does not exist is 404", async () => {
    expect(await statusOf(users.admin!, 999_999, "viewOpen")).toBe(404);
  });

  it("roles are per trial: unblinded on one trial, blinded sponsor on another", async () => {
    expect(await statusOf(users.unblinded_statistician!, trialId, "viewClosed")).toBe(200);
    expect(await statusOf(users.unblinded_statistician!, otherTrialId, "viewClosed")).toBe(403);
    const access = await checkTrialAccess(users.unblinded_statistician!, otherTrialId, "viewOpen");
    expect(access.unblinded).toBe(false);
  });

  it("removing a role takes effect at the next check", async () => {
    const u = await makeUser();
    await giveRole(u.id, trialId, "dmc_member");
    expect(await statusOf(u, trialId, "viewClosed")).toBe(200);
    await db("trial_memberships").where({ user_id: u.id }).delete();
    expect(await statusOf(u, trialId, "viewClosed")).toBe(404);
  });
});
