/**
 * A trial keeps at least one active unblinded statistician: removing the last one's role
 * (lib/auth/accounts.ts revokeTrialRole) or deactivating the last one's account (setAccountActive)
 * is refused on the server, through the admin page's server actions, and the refusal changes
 * nothing (the role and the account stay, no audit row).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { actAs, currentClaims, currentSession } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));
vi.mock("@/lib/mail/delivery", () => ({ ensureMailWorker: vi.fn(), deliverWithRetries: vi.fn(async () => ({})), deliverAfterResponse: vi.fn() }));

import { deactivateAccount, removeRole } from "@/app/admin/actions";
import { revokeTrialRole, setAccountActive } from "@/lib/auth/accounts";
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

describe("deactivating a trial's last unblinded statistician", () => {
  const isActive = async (userId: number) => Boolean((await db("users").where({ id: userId }).first()).is_active);
  const deactivations = async (userId: number) => Number((await db("audit_events").where({ action: "account_deactivated", entity_id: String(userId) }).count({ n: "*" }).first())!.n);
  function accountForm(userId: number): FormData {
    const f = new FormData();
    f.set("userId", String(userId));
    return f;
  }

  it("is refused with a sentence naming the person and only the trial left without one, and changes nothing", async () => {
    const alone = await makeTrial({ code: "DEACT-1" });
    const shared = await makeTrial({ code: "DEACT-2" });
    const stat = await makeUser({ name: "Sole Statistician" });
    const colleague = await makeUser({ name: "Colleague Statistician" });
    await giveRole(stat.id, alone, "unblinded_statistician");
    await giveRole(stat.id, shared, "unblinded_statistician");
    await giveRole(colleague.id, shared, "unblinded_statistician");
    const sessionVersion = (await db("users").where({ id: stat.id }).first()).session_version;
    actAs(admin.id);
    const state = await deactivateAccount({}, accountForm(stat.id));
    expect(state.error).toBe("Sole Statistician is the last unblinded statistician on DEACT-1. Give the role to someone else first: the trial needs one to review looks and prepare the closed packet.");
    expect(state.ok).toBeUndefined();
    expect(await isActive(stat.id)).toBe(true);
    expect((await db("users").where({ id: stat.id }).first()).session_version).toBe(sessionVersion);
    expect(await deactivations(stat.id)).toBe(0);
  });

  it("names every trial it would leave without one", async () => {
    const t1 = await makeTrial({ code: "DEACT-3" });
    const t2 = await makeTrial({ code: "DEACT-4" });
    const stat = await makeUser({ name: "Twice Alone" });
    await giveRole(stat.id, t1, "unblinded_statistician");
    await giveRole(stat.id, t2, "unblinded_statistician");
    await expect(setAccountActive(admin, stat.id, false)).rejects.toMatchObject({ status: 409, message: expect.stringMatching(/^Twice Alone is the last unblinded statistician on DEACT-3 and DEACT-4\./) });
    expect(await isActive(stat.id)).toBe(true);
  });

  it("deactivating a statistician who is not the last still works (and other roles never block it); then the last one is refused", async () => {
    const trialId = await makeTrial({ code: "DEACT-5" });
    const s1 = await makeUser({ name: "First of Two" });
    const s2 = await makeUser({ name: "Second of Two" });
    const sponsor = await makeUser({ name: "Lone Sponsor" });
    await giveRole(s1.id, trialId, "unblinded_statistician");
    await giveRole(s2.id, trialId, "unblinded_statistician");
    await giveRole(sponsor.id, trialId, "sponsor");
    actAs(admin.id);
    expect(await deactivateAccount({}, accountForm(s1.id))).toEqual({ ok: "First of Two is deactivated and signed out everywhere." });
    expect(await isActive(s1.id)).toBe(false);
    expect(await deactivations(s1.id)).toBe(1);
    expect(await deactivateAccount({}, accountForm(sponsor.id))).toEqual({ ok: "Lone Sponsor is deactivated and signed out everywhere." });
    expect((await deactivateAccount({}, accountForm(s2.id))).error).toMatch(/^Second of Two is the last unblinded statistician on DEACT-5\./);
    expect(await isActive(s2.id)).toBe(true);
    // Reactivating the first is never refused; then the second may go.
    await setAccountActive(admin, s1.id, true);
    await setAccountActive(admin, s2.id, false);
    expect(await isActive(s2.id)).toBe(false);
  });

  it("two administrators deactivating the last two statisticians at once: exactly one succeeds", async () => {
    const trialId = await makeTrial({ code: "DEACT-6" });
    const s1 = await makeUser({ name: "Deactivation Racer One" });
    const s2 = await makeUser({ name: "Deactivation Racer Two" });
    await giveRole(s1.id, trialId, "unblinded_statistician");
    await giveRole(s2.id, trialId, "unblinded_statistician");
    const results = await Promise.allSettled([setAccountActive(admin, s1.id, false), setAccountActive(admin2, s2.id, false)]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    expect(results.filter((r) => r.status === "rejected").map((r) => (r as PromiseRejectedResult).reason.status)).toEqual([409]);
    expect([await isActive(s1.id), await isActive(s2.id)].filter(Boolean)).toHaveLength(1);
  });

  it("one administrator deactivating one statistician while another removes the other's role: exactly one succeeds", async () => {
    const trialId = await makeTrial({ code: "DEACT-7" });
    const s1 = await makeUser({ name: "Mixed Racer One" });
    const s2 = await makeUser({ name: "Mixed Racer Two" });
    await giveRole(s1.id, trialId, "unblinded_statistician");
    await giveRole(s2.id, trialId, "unblinded_statistician");
    const results = await Promise.allSettled([setAccountActive(admin, s1.id, false), revokeTrialRole(admin2, (await membership(trialId, s2.id))!)]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    expect(results.filter((r) => r.status === "rejected").map((r) => (r as PromiseRejectedResult).reason.status)).toEqual([409]);
    const left = await db("trial_memberships as m").join("users as u", "u.id", "m.user_id").where({ "m.trial_id": trialId, "m.role": "unblinded_statistician", "u.is_active": true }).count({ n: "*" }).first();
    expect(Number(left!.n)).toBe(1);
  });
});
