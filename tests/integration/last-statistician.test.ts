/**
 * A trial keeps at least one active unblinded statistician: removing the last one is refused on the
 * server (lib/auth/accounts.ts revokeTrialRole), through the admin page's server action, and the
 * refusal changes nothing (the role stays, no audit row).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { actAs, currentClaims, currentSession } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));
vi.mock("@/lib/mail/delivery", () => ({ ensureMailWorker: vi.fn(), deliverWithRetries: vi.fn(async () => ({})) }));

import { removeRole } from "@/app/admin/actions";
import { revokeTrialRole } from "@/lib/auth/accounts";
import { db, giveRole, makeTrial, makeUser, resetDatabase } from "./support/db";

let admin: Awaited<ReturnType<typeof makeUser>>;
let admin2: Awaited<ReturnType<typeof makeUser>>;

beforeAll(async () => {
  await resetDatabase();
  admin = await makeUser({ isAdmin: true, name: "First Administrator" });
  admin2 = await makeUser({ isAdmin: true, name: "Second Administrator" });
});
afterAll(async () => {
  await db.destroy();
});

const membership = async (trialId: number, userId: number, role = "unblinded_statistician") => (await db("trial_memberships").where({ trial_id: trialId, user_id: userId, role }).first())?.id as number | undefined;
const removals = async (trialId: number) => Number((await db("audit_events").where({ trial_id: trialId, action: "role_removed" }).count({ n: "*" }).first())!.n);

function removeForm(membershipId: number): FormData {
  const f = new FormData();
  f.set("membershipId", String(membershipId));
  return f;
}

describe("removing a trial's last unblinded statistician", () => {
  it("is refused with a sentence naming the person and the trial, and changes nothing", async () => {
    const trialId = await makeTrial({ code: "LAST-1" });
    const stat = await makeUser({ name: "Only Statistician" });
    await giveRole(stat.id, trialId, "unblinded_statistician");
    const id = (await membership(trialId, stat.id))!;
    actAs(admin.id);
    const state = await removeRole({}, removeForm(id));
    expect(state.error).toMatch(/Only Statistician is the last unblinded statistician on LAST-1/);
    expect(state.ok).toBeUndefined();
    expect(await membership(trialId, stat.id)).toBe(id);
    expect(await removals(trialId)).toBe(0);
  });

  it("is allowed while another active statistician remains, then refused for the one left", async () => {
    const trialId = await makeTrial({ code: "LAST-2" });
    const s1 = await makeUser({ name: "Statistician One" });
    const s2 = await makeUser({ name: "Statistician Two" });
    await giveRole(s1.id, trialId, "unblinded_statistician");
    await giveRole(s2.id, trialId, "unblinded_statistician");
    actAs(admin.id);
    expect(await removeRole({}, removeForm((await membership(trialId, s1.id))!))).toEqual({ ok: "Role removed." });
    expect(await membership(trialId, s1.id)).toBeUndefined();
    expect((await removeRole({}, removeForm((await membership(trialId, s2.id))!))).error).toMatch(/Statistician Two is the last unblinded statistician/);
    expect(await membership(trialId, s2.id)).toBeDefined();
    expect(await removals(trialId)).toBe(1);
  });

  it("does not count a deactivated account as the one that remains", async () => {
    const trialId = await makeTrial({ code: "LAST-3" });
    const active = await makeUser({ name: "Active Statistician" });
    const gone = await makeUser({ name: "Deactivated Statistician" });
    await giveRole(active.id, trialId, "unblinded_statistician");
    await giveRole(gone.id, trialId, "unblinded_statistician");
    await db("users").where({ id: gone.id }).update({ is_active: false });
    await expect(revokeTrialRole(admin, (await membership(trialId, active.id))!)).rejects.toMatchObject({ status: 409 });
    expect(await membership(trialId, active.id)).toBeDefined();
  });

  it("other roles are removed as before, even the last DMC member's", async () => {
    const trialId = await makeTrial({ code: "LAST-4" });
    const dmc = await makeUser({ name: "Lone DMC member" });
    await giveRole(dmc.id, trialId, "dmc_member");
    await revokeTrialRole(admin, (await membership(trialId, dmc.id, "dmc_member"))!);
    expect(await membership(trialId, dmc.id, "dmc_member")).toBeUndefined();
  });

  it("two administrators removing the last two statisticians at once: exactly one removal succeeds", async () => {
    const trialId = await makeTrial({ code: "LAST-5" });
    const s1 = await makeUser({ name: "Racing One" });
    const s2 = await makeUser({ name: "Racing Two" });
    await giveRole(s1.id, trialId, "unblinded_statistician");
    await giveRole(s2.id, trialId, "unblinded_statistician");
    const results = await Promise.allSettled([revokeTrialRole(admin, (await membership(trialId, s1.id))!), revokeTrialRole(admin2, (await membership(trialId, s2.id))!)]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    expect(results.filter((r) => r.status === "rejected").map((r) => (r as PromiseRejectedResult).reason.status)).toEqual([409]);
    expect(await db("trial_memberships").where({ trial_id: trialId, role: "unblinded_statistician" }).count({ n: "*" }).first()).toMatchObject({ n: 1 });
    expect(await removals(trialId)).toBe(1);
  });
});
