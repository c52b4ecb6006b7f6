/**
 * The calibrations route for a two-arm trial, called as an unblinded statistician: a small search is
 * accepted and ends with the engine's best designs; a grid over the two-arm work budget is refused
 * with a clear 422 and starts nothing.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { actAs, currentClaims, currentSession, jsonRequest, routeContext } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));

import { db, giveRole, makeTrial, makeUser, resetDatabase } from "./support/db";
import * as calibrations from "@/app/api/trials/[trialId]/calibrations/route";
import * as calibrationJob from "@/app/api/trials/[trialId]/calibrations/[jobId]/route";
import { calibrateTwoArm } from "@/lib/stats/calibration-two-arm";
import { maxTwoArmSearchPoints } from "@/lib/design/api-schemas";
import { smallTwoArmDesign } from "@/lib/jobs/test-design";

let trialId: number;

beforeAll(async () => {
  await resetDatabase();
  trialId = await makeTrial({ designType: "two" });
  const stat = await makeUser();
  await giveRole(stat.id, trialId, "unblinded_statistician");
  actAs(stat.id);
});
afterAll(async () => {
  await db.destroy();
});

const body = (over: Record<string, unknown> = {}) => ({
  spec: smallTwoArmDesign,
  typeIErrorLimit: 0.2,
  powerTarget: 0.5,
  thetaT: { from: 0.85, to: 0.95, step: 0.05 },
  thetaL: { from: 0, to: 0.1, step: 0.05 },
  thetaU: { from: 0.97, to: 0.99, step: 0.02 },
  keep: 4,
  ...over,
});

describe("POST /api/trials/{id}/calibrations for two arms", () => {
  it("starts a two-arm search that ends with the engine's best designs", async () => {
    const res = await calibrations.POST(jsonRequest("/x", "POST", body()), routeContext({ trialId: String(trialId) }));
    expect(res.status).toBe(202);
    const { job } = await res.json();
    expect(job.total).toBe(18);
    let seen = job;
    // Wait on the job's own state, polled as the page does.
    for (let i = 0; i < 600 && (seen.status === "running" || seen.status === "cancelling"); i++) {
      await new Promise((r) => setTimeout(r, 50));
      seen = (await (await calibrationJob.GET(jsonRequest("/x", "GET"), routeContext({ trialId: String(trialId), jobId: job.id }))).json()).job;
    }
    expect(seen.status).toBe("done");
    expect(seen.arms).toBe("two");
    const whole = calibrateTwoArm(smallTwoArmDesign, { thetaTGrid: [0.85, 0.9, 0.95], thetaLGrid: [0, 0.05, 0.1], thetaUGrid: [0.97, 0.99], typeIErrorLimit: 0.2, powerTarget: 0.5, keep: 4 });
    expect(seen.best).toEqual(JSON.parse(JSON.stringify(whole.best)));
  });

  it("refuses a grid over the two-arm work budget with a 422 naming the limit, and starts nothing", async () => {
    const big = { ...smallTwoArmDesign, nMaxPerArm: 200, looks: { kind: "every", first: 5, every: 5 } };
    const max = maxTwoArmSearchPoints(big as typeof smallTwoArmDesign);
    const before = await db("calibration_jobs").count({ n: "*" });
    const res = await calibrations.POST(
      jsonRequest("/x", "POST", body({ spec: big, thetaT: { from: 0.8, to: 0.99, step: 0.005 }, thetaL: { from: 0, to: 0.2, step: 0.005 }, thetaU: null })),
      routeContext({ trialId: String(trialId) }),
    );
    // thetaU: null with efficacy stopping on searches the design's own early-success bar.
    expect(39 * 41).toBeGreaterThan(max);
    expect(res.status).toBe(422);
    expect((await res.json()).error).toContain(`at most ${max}`);
    expect(await db("calibration_jobs").count({ n: "*" })).toEqual(before);
  });
});
