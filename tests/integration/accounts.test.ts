/**
 * Accounts and signatures (issue 12): each test is named after the attack it stops. The server
 * actions run for real against MariaDB as the application's account; only the session cookie is
 * replaced (lib/auth/session is mocked to say who is signed in, with the account's current version).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import bcrypt from "bcryptjs";
import { actAs, currentClaims, currentSession } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));
// Delivery is tested in mail.test.ts; here its background sweep would add audit rows mid-test.
vi.mock("@/lib/mail/delivery", () => ({ ensureMailWorker: vi.fn(), deliverWithRetries: vi.fn(async () => ({})), deliverAfterResponse: vi.fn() }));

import { assignRole, createAccount, deactivateAccount, reactivateAccount, sendPasswordLink } from "@/app/admin/actions";
import { setPassword } from "@/app/set-password/actions";
import { changePassword } from "@/app/account/actions";
import { confirmSigner } from "@/lib/auth/signature";
import { endSessions } from "@/lib/auth/options";
import { setPasswordWithLink, tokenSha256 } from "@/lib/auth/accounts";
import { requireTrialAccess } from "@/lib/auth";
import { insertSignature } from "@/db/queries/signatures";
import { SIGN_IN_LIMITS } from "@/lib/auth/rate-limit";
import { statusOf } from "./support/status";
import { db, giveRole, makeTrial, makeUser, ownerKnex, resetDatabase } from "./support/db";

let admin: Awaited<ReturnType<typeof makeUser>>;
let admin2: Awaited<ReturnType<typeof makeUser>>;
let trialId: number;

beforeAll(async () => {
  await resetDatabase();
  admin = await makeUser({ isAdmin: true, name: "First Administrator" });
  admin2 = await makeUser({ isAdmin: true, name: "Second Administrator" });
  trialId = await makeTrial();
});
afterAll(async () => {
  await db.destroy();
});

function formOf(entries: Record<string, string>): FormData {
  const f = new FormData();
  for (const [k, v] of Object.entries(entries)) f.set(k, v);
  return f;
}
const tokenOf = (url: string) => url.slice(url.indexOf("#") + 1);
const count = async (t: string, where: Record<string, unknown> = {}) => Number((await db(t).where(where).count({ n: "*" }).first())?.n);
const sessionVersion = async (id: number) => Number((await db("users").where({ id }).first("session_version")).session_version);

/** Creates an account as `admin` through the real action; returns its id and the one-time link. */
async function createThroughAdmin(name: string, email: string, extra: Record<string, string> = {}) {
  actAs(admin.id);
  const state = await createAccount({}, formOf({ name, email, ...extra }));
  expect(state.ok, state.error).toBeTruthy();
  const user = await db("users").where({ email }).first();
  return { id: user.id as number, link: state.link!.url, user };
}

describe("finding 1: the administrator never knows a signer's password", () => {
  it("an administrator cannot sign as a statistician because they never learn the password", async () => {
    // The administrator even tries to slip a password of their choosing into the form.
    const { id, link } = await createThroughAdmin("Stat Owner", "stat.owner@test.example", { password: "chosen-by-the-admin-1" });
    const row = await db("users").where({ id }).first();
    expect(row.password_hash.startsWith("$2")).toBe(false);
    const asUser = { id, email: row.email, name: row.name, isAdmin: false, isActive: true };
    await expect(confirmSigner(asUser, "chosen-by-the-admin-1", "198.51.100.1")).rejects.toThrow(/not correct/);
    // The owner sets their own password through the link; only then can they sign.
    actAs(null);
    const set = await setPassword({}, formOf({ token: tokenOf(link), newPassword: "owner-only-secret-42", confirmPassword: "owner-only-secret-42" }));
    expect(set.ok, set.error).toBeTruthy();
    await expect(confirmSigner(asUser, "owner-only-secret-42", "198.51.100.1")).resolves.toBeUndefined();
    // Nothing the administrator can read carries the password or its hash.
    const trail = JSON.stringify(await db("audit_events").where({ entity_id: id, entity_type: "user" }));
    const mails = JSON.stringify(await db("email_messages").where({ to_user_id: id }));
    const newHash = (await db("users").where({ id }).first()).password_hash as string;
    for (const text of [trail, mails]) {
      expect(text).not.toContain("owner-only-secret-42");
      expect(text).not.toContain(newHash);
    }
  });

  it("a set-password link is 256 random bits, stored only as its SHA-256, and e-mailed to the owner", async () => {
    const { id, link } = await createThroughAdmin("Link Owner", "link.owner@test.example");
    const token = tokenOf(link);
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/); // 32 bytes in base64url
    expect(Buffer.from(token, "base64url")).toHaveLength(32);
    const stored = await db("password_links").where({ user_id: id });
    expect(stored).toHaveLength(1);
    // SHA-256 recomputed here with node:crypto's own test vector checked first ("abc", FIPS 180-2 appendix B.1).
    expect(tokenSha256("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    expect(stored[0].token_sha256).toBe(tokenSha256(token));
    expect(JSON.stringify(stored)).not.toContain(token);
    const mail = await db("email_messages").where({ to_user_id: id, kind: "password_link" }).first();
    expect(mail.to_address).toBe("link.owner@test.example");
    expect(mail.body_text).toContain(link);
    expect(mail.trial_id).toBeNull();
  });

  it("a used set-password link cannot be used again (by whoever saw it afterwards)", async () => {
    const { link } = await createThroughAdmin("Once Only", "once.only@test.example");
    actAs(null);
    const first = await setPassword({}, formOf({ token: tokenOf(link), newPassword: "first-choice-pass", confirmPassword: "first-choice-pass" }));
    expect(first.ok).toBeTruthy();
    const before = (await db("users").where({ email: "once.only@test.example" }).first()).password_hash;
    const again = await setPassword({}, formOf({ token: tokenOf(link), newPassword: "second-choice-pass", confirmPassword: "second-choice-pass" }));
    expect(again.error).toMatch(/not valid/);
    expect((await db("users").where({ email: "once.only@test.example" }).first()).password_hash).toBe(before);
  });

  it("an expired set-password link is refused", async () => {
    const { id, link } = await createThroughAdmin("Late Comer", "late.comer@test.example");
    await expect(setPasswordWithLink(tokenOf(link), "too-late-password", new Date(Date.now() + 25 * 3_600_000))).rejects.toThrow(/not valid/);
    expect((await db("users").where({ id }).first()).password_hash.startsWith("$2")).toBe(false);
  });

  it("re-issuing a link kills the older link but does not lock the owner out before the new one is used", async () => {
    const { id, link: oldLink } = await createThroughAdmin("Re Issue", "re.issue@test.example");
    await setPasswordWithLink(tokenOf(oldLink), "current-password-1");
    actAs(admin.id);
    const first = await sendPasswordLink({}, formOf({ userId: String(id) }));
    const second = await sendPasswordLink({}, formOf({ userId: String(id) }));
    expect(first.link && second.link).toBeTruthy();
    const row = await db("users").where({ id }).first();
    expect(await bcrypt.compare("current-password-1", row.password_hash)).toBe(true);
    await expect(setPasswordWithLink(tokenOf(first.link!.url), "from-the-old-link")).rejects.toThrow(/not valid/);
    const v = await sessionVersion(id);
    await setPasswordWithLink(tokenOf(second.link!.url), "from-the-new-link");
    expect(await sessionVersion(id)).toBe(v + 1);
    expect(await count("email_messages", { to_user_id: id, kind: "password_changed" })).toBe(2);
    expect(await count("audit_events", { entity_id: id, action: "password_link_issued" })).toBe(2);
  });

  it("set-password refuses bad input with a clear message and writes nothing", async () => {
    const { link } = await createThroughAdmin("Bad Input", "bad.input@test.example");
    actAs(null);
    const cases: Array<[Record<string, string>, RegExp]> = [
      [{ newPassword: "long-enough-pass", confirmPassword: "long-enough-pass" }, /without/],
      [{ token: "short", newPassword: "long-enough-pass", confirmPassword: "long-enough-pass" }, /valid link/],
      [{ token: tokenOf(link), newPassword: "short", confirmPassword: "short" }, /Check the highlighted/],
      [{ token: tokenOf(link), newPassword: "long-enough-pass", confirmPassword: "different-pass!" }, /Check the highlighted/],
      [{ token: "A".repeat(43), newPassword: "long-enough-pass", confirmPassword: "long-enough-pass" }, /not valid/],
    ];
    for (const [payload, message] of cases) {
      const audit = await count("audit_events");
      const users = JSON.stringify(await db("users").select("password_hash", "session_version"));
      const state = await setPassword({}, formOf(payload));
      expect(state.error).toMatch(message);
      expect(await count("audit_events")).toBe(audit);
      expect(JSON.stringify(await db("users").select("password_hash", "session_version"))).toBe(users);
    }
  });
});

describe("finding 1: everyone changes their own password", () => {
  it("a thief with a session but not the password cannot change it, and the attempt is audited", async () => {
    const u = await makeUser();
    actAs(u.id);
    const state = await changePassword({}, formOf({ currentPassword: "a-wrong-guess", newPassword: "thief-chosen-pass", confirmPassword: "thief-chosen-pass" }));
    expect(state.fieldErrors?.currentPassword?.[0]).toMatch(/not correct/);
    expect(await bcrypt.compare(u.password, (await db("users").where({ id: u.id }).first()).password_hash)).toBe(true);
    expect(await count("audit_events", { action: "password_change_failed", entity_id: u.id })).toBe(1);
  });

  it("the owner changes their password with the current one; every session, this one included, ends", async () => {
    const u = await makeUser();
    actAs(u.id);
    const v = await sessionVersion(u.id);
    const state = await changePassword({}, formOf({ currentPassword: u.password, newPassword: "a-brand-new-pass", confirmPassword: "a-brand-new-pass" }));
    expect(state.ok, state.error).toBeTruthy();
    expect(await sessionVersion(u.id)).toBe(v + 1);
    expect(await bcrypt.compare("a-brand-new-pass", (await db("users").where({ id: u.id }).first()).password_hash)).toBe(true);
    expect(await count("email_messages", { to_user_id: u.id, kind: "password_changed" })).toBe(1);
  });

  it("change-password refuses bad input with a clear message and writes nothing", async () => {
    const u = await makeUser();
    actAs(u.id);
    const cases: Record<string, string>[] = [
      {},
      { currentPassword: u.password, newPassword: "short", confirmPassword: "short" },
      { currentPassword: u.password, newPassword: "long-enough-pass", confirmPassword: "not-the-same-pass" },
      { currentPassword: u.password, newPassword: u.password, confirmPassword: u.password },
      { currentPassword: "x".repeat(201), newPassword: "long-enough-pass", confirmPassword: "long-enough-pass" },
    ];
    for (const payload of cases) {
      const audit = await count("audit_events");
      const row = JSON.stringify(await db("users").where({ id: u.id }).first("password_hash", "session_version"));
      const state = await changePassword({}, formOf(payload));
      expect(state.error).toBe("Check the highlighted fields.");
      expect(Object.keys(state.fieldErrors ?? {}).length).toBeGreaterThan(0);
      expect(await count("audit_events")).toBe(audit);
      expect(JSON.stringify(await db("users").where({ id: u.id }).first("password_hash", "session_version"))).toBe(row);
    }
  });
});

describe("finding 2: the signing password is throttled and audited", () => {
  it("someone at an unlocked screen cannot guess the signing password at full speed, and every wrong guess is on the record", async () => {
    const u = await makeUser();
    const who = { id: u.id, email: u.email, name: u.name, isAdmin: false, isActive: true };
    const free = SIGN_IN_LIMITS.perPair.freeFailures;
    for (let i = 0; i <= free; i++) await expect(confirmSigner(who, `guess-${i}`, "192.0.2.50")).rejects.toMatchObject({ status: 422 });
    // The next try, even with the right password, waits: 429 and nothing signed.
    await expect(confirmSigner(who, u.password, "192.0.2.50")).rejects.toMatchObject({ status: 429 });
    const rows = await db("audit_events").where({ action: "signature_password_failed", entity_id: u.id });
    expect(rows).toHaveLength(free + 1);
    for (const r of rows) expect(r.visibility).toBe("open");
    expect(JSON.stringify(rows)).not.toMatch(/guess-/);
    // The owner at their own address signs.
    await expect(confirmSigner(who, u.password, "192.0.2.51")).resolves.toBeUndefined();
  });
});

describe("finding 3: signatures, recommendations and the audit trail are append-only", () => {
  it("the application's database account cannot rewrite or delete a signature, a recommendation or an account", async () => {
    const u = await makeUser();
    const sig = await db.transaction((tx) =>
      insertSignature(tx, { userId: u.id, signerName: u.name, signerEmail: u.email, meaning: "design approved", entityType: "design", entityId: 1, record: { a: 1 } }),
    );
    await expect(db("signatures").where({ id: sig.id }).update({ signer_name: "Someone Else" })).rejects.toThrow(/UPDATE command denied/);
    await expect(db("signatures").where({ id: sig.id }).del()).rejects.toThrow(/DELETE command denied/);
    await expect(db("recommendations").where({ id: 1 }).update({ rationale: "rewritten" })).rejects.toThrow(/UPDATE command denied/);
    await expect(db("recommendations").where({ id: 1 }).del()).rejects.toThrow(/DELETE command denied/);
    await expect(db("users").where({ id: u.id }).del()).rejects.toThrow(/DELETE command denied/);
    expect((await db("signatures").where({ id: sig.id }).first()).signer_name).toBe(u.name);
  });

  it("even the schema owner cannot rewrite or delete a signature or a recommendation (triggers)", async () => {
    const u = await makeUser();
    const sig = await db.transaction((tx) =>
      insertSignature(tx, { userId: u.id, signerName: u.name, signerEmail: u.email, meaning: "recommendation recorded", entityType: "analysis", entityId: 1, record: { b: 2 } }),
    );
    const owner = ownerKnex();
    try {
      await expect(owner("signatures").where({ id: sig.id }).update({ signer_name: "x" })).rejects.toThrow(/append-only/);
      await expect(owner("signatures").where({ id: sig.id }).del()).rejects.toThrow(/append-only/);
      const recId = await owner.transaction(async (tx) => {
        await tx.raw("SET FOREIGN_KEY_CHECKS = 0");
        const [id] = await tx("recommendations").insert({ trial_id: trialId, analysis_id: 999_999, decision: "continue", rationale: "invented", signature_id: sig.id, created_by: u.id });
        await tx.raw("SET FOREIGN_KEY_CHECKS = 1");
        return id;
      });
      await expect(owner("recommendations").where({ id: recId }).update({ decision: "stop_efficacy" })).rejects.toThrow(/append-only/);
      await expect(owner("recommendations").where({ id: recId }).del()).rejects.toThrow(/append-only/);
      expect((await owner("recommendations").where({ id: recId }).first()).decision).toBe("continue");
    } finally {
      await owner.destroy();
    }
  });
});

describe("finding 4 and 5: deactivation and sign-out end sessions at once", () => {
  it("a deactivated person's still-open session is refused at the next request, and the account remains on record", async () => {
    const u = await makeUser();
    await giveRole(u.id, trialId, "sponsor");
    actAs(u.id);
    const claims = await currentClaims();
    expect(await statusOf(requireTrialAccess(trialId, "viewOpen"))).toBe(200);
    actAs(admin.id);
    const state = await deactivateAccount({}, formOf({ userId: String(u.id) }));
    expect(state.ok, state.error).toMatch(/deactivated/);
    // The session issued before (same claims) no longer works.
    const session = await import("@/lib/auth/session");
    vi.mocked(session.sessionClaims).mockResolvedValueOnce(claims);
    expect(await statusOf(requireTrialAccess(trialId, "viewOpen"))).toBe(401);
    expect(await count("users", { id: u.id })).toBe(1);
    const audit = await db("audit_events").where({ action: "account_deactivated", entity_id: u.id }).first();
    expect(audit.actor_user_id).toBe(admin.id);
    // Reactivation does not revive the old session either.
    await reactivateAccount({}, formOf({ userId: String(u.id) }));
    vi.mocked(session.sessionClaims).mockResolvedValueOnce(claims);
    expect(await statusOf(requireTrialAccess(trialId, "viewOpen"))).toBe(401);
  });

  it("an administrator cannot deactivate their own account (no lock-out of the last administrator)", async () => {
    actAs(admin.id);
    const state = await deactivateAccount({}, formOf({ userId: String(admin.id) }));
    expect(state.error).toMatch(/another administrator/);
    expect((await db("users").where({ id: admin.id }).first()).is_active).toBeTruthy();
  });

  it("deactivate refuses bad input with a clear message and writes nothing", async () => {
    actAs(admin.id);
    for (const userId of ["", "abc", "-1", "0", "1.5", "99999999"]) {
      const audit = await count("audit_events");
      const state = await deactivateAccount({}, formOf({ userId }));
      expect(state.error).toBeTruthy();
      expect(await count("audit_events")).toBe(audit);
    }
    expect(await count("users", { is_active: false })).toBe(0);
  });

  it("a copied session is refused after its owner signs out", async () => {
    const u = await makeUser();
    await giveRole(u.id, trialId, "coordinator");
    actAs(u.id);
    const copied = await currentClaims();
    await endSessions(u.id, u.email);
    const session = await import("@/lib/auth/session");
    vi.mocked(session.sessionClaims).mockResolvedValueOnce(copied);
    expect(await statusOf(requireTrialAccess(trialId, "viewOpen"))).toBe(401);
    expect(await count("audit_events", { action: "sign_out", entity_id: u.id })).toBe(1);
  });
});

describe("finding 6: separation of duties", () => {
  it("an administrator cannot make themselves unblinded; a second administrator can, and the audit names both", async () => {
    actAs(admin.id);
    const self = await assignRole({}, formOf({ userId: String(admin.id), trialId: String(trialId), role: "dmc_member" }));
    expect(self.fieldErrors?.role?.[0]).toMatch(/second administrator/);
    expect(await count("trial_memberships", { user_id: admin.id })).toBe(0);
    actAs(admin2.id);
    const other = await assignRole({}, formOf({ userId: String(admin.id), trialId: String(trialId), role: "dmc_member" }));
    expect(other.ok, other.error).toBeTruthy();
    const row = await db("audit_events").where({ action: "role_assigned", trial_id: trialId }).orderBy("id", "desc").first();
    expect(row.actor_user_id).toBe(admin2.id);
    const values = JSON.parse(row.new_values);
    expect(values.grantedBy).toEqual({ id: admin2.id, email: admin2.email });
    expect(values.grantedTo).toEqual({ id: admin.id, email: admin.email });
  });

  it("a sponsor cannot also be made DMC member or unblinded statistician on the same trial, nor the reverse", async () => {
    const sponsor = await makeUser();
    const dmc = await makeUser();
    actAs(admin.id);
    expect((await assignRole({}, formOf({ userId: String(sponsor.id), trialId: String(trialId), role: "sponsor" }))).ok).toBeTruthy();
    expect((await assignRole({}, formOf({ userId: String(dmc.id), trialId: String(trialId), role: "dmc_member" }))).ok).toBeTruthy();
    for (const [who, role] of [[sponsor, "dmc_member"], [sponsor, "unblinded_statistician"], [dmc, "sponsor"], [dmc, "coordinator"]] as const) {
      const before = await count("trial_memberships");
      const state = await assignRole({}, formOf({ userId: String(who.id), trialId: String(trialId), role }));
      expect(state.fieldErrors?.role?.[0]).toMatch(/blinded and unblinded sides/);
      expect(await count("trial_memberships")).toBe(before);
    }
    // On another trial the same person may hold the other side.
    const other = await makeTrial();
    expect((await assignRole({}, formOf({ userId: String(sponsor.id), trialId: String(other), role: "dmc_member" }))).ok).toBeTruthy();
  });

  it("role change refuses bad input with a clear message and writes nothing", async () => {
    actAs(admin.id);
    for (const payload of [{} as Record<string, string>, { userId: "x", trialId: String(trialId), role: "sponsor" }, { userId: String(admin.id), trialId: "0", role: "sponsor" }, { userId: String(admin.id), trialId: String(trialId), role: "owner" }, { userId: "99999999", trialId: String(trialId), role: "sponsor" }]) {
      const before = await count("trial_memberships");
      const audit = await count("audit_events");
      const state = await assignRole({}, formOf(payload));
      expect(state.error).toBeTruthy();
      expect(await count("trial_memberships")).toBe(before);
      expect(await count("audit_events")).toBe(audit);
    }
  });
});
