/**
 * Password throttling counts failures in MariaDB, so every web process sees the same count and a
 * restart forgets nothing. The rule: a growing delay per (account, address) pair, and a cap per
 * address; never a lock on the account itself (that would let anyone lock its owner out).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db/knex";
import { SIGN_IN_LIMITS } from "@/lib/auth/rate-limit";
import { clearPairFailures, recordSignInFailure, signInWaitMs } from "@/lib/auth/sign-in-throttle";
import { authorizeSignIn } from "@/lib/auth/options";
import { makeUser, resetDatabase } from "./support/db";

beforeAll(resetDatabase);
afterAll(async () => {
  await db.destroy();
});

const now = Date.parse("2026-12-02T10:00:00.000Z");
const { perPair, perAddress } = SIGN_IN_LIMITS;

describe("password throttling in MariaDB", () => {
  it("a stranger typing wrong passwords for someone cannot lock them out: the owner, from their own address, is not slowed", async () => {
    for (let i = 0; i < 20; i++) await recordSignInFailure("ana@test.example", "203.0.113.66", now + i);
    expect(await signInWaitMs("ana@test.example", "203.0.113.66", now + 20)).toBeGreaterThan(0);
    expect(await signInWaitMs("ana@test.example", "198.51.100.5", now + 20)).toBe(0);
  });

  it("an attacker guessing one account from one address waits twice as long after each wrong guess", async () => {
    const acct = "ben@test.example";
    const addr = "192.0.2.10";
    for (let i = 0; i < perPair.freeFailures; i++) {
      expect(await signInWaitMs(acct, addr, now + i)).toBe(0);
      await recordSignInFailure(acct, addr, now + i);
    }
    // The free failures cost nothing; each failure past them doubles the wait (from the latest failure).
    const last = now + perPair.freeFailures - 1;
    expect(await signInWaitMs(acct, addr, last + 1)).toBe(0);
    await recordSignInFailure(acct, addr, last + 1);
    expect(await signInWaitMs(acct, addr, last + 2)).toBe(perPair.baseDelayMs - 1);
    await recordSignInFailure(acct, addr, last + 2);
    expect(await signInWaitMs(acct, addr, last + 3)).toBe(2 * perPair.baseDelayMs - 1);
    await recordSignInFailure(acct, addr, last + 3);
    expect(await signInWaitMs(acct, addr, last + 4)).toBe(4 * perPair.baseDelayMs - 1);
  });

  it("a correct password clears the pair's count but not the address's", async () => {
    await clearPairFailures("ben@test.example", "192.0.2.10");
    expect(await signInWaitMs("ben@test.example", "192.0.2.10", now + 10)).toBe(0);
    expect(await db("sign_in_failures").where({ scope: "address", subject: "192.0.2.10" }).count({ n: "*" })).toEqual([{ n: perPair.freeFailures + 3 }]);
  });

  it("an address spraying one guess at each of many accounts is stopped after the per-address cap", async () => {
    for (let i = 0; i < perAddress.maxFailures; i++) await recordSignInFailure(`user${i}@test.example`, "203.0.113.7", now + i);
    expect(await signInWaitMs("new@test.example", "203.0.113.7", now + perAddress.maxFailures)).toBeGreaterThan(0);
    expect(await signInWaitMs("new@test.example", "203.0.113.8", now + perAddress.maxFailures)).toBe(0);
  });

  it("forgets failures older than the window as new ones arrive", async () => {
    const later = now + perPair.windowMs + 60_000;
    await recordSignInFailure("cy@test.example", "192.0.2.1", later);
    const left = (await db("sign_in_failures").select("scope", "subject")) as { scope: string; subject: string }[];
    expect(left.map((r) => `${r.scope}:${r.subject}`).sort()).toEqual(["address:192.0.2.1", "pair:cy@test.example\n192.0.2.1"]);
  });
});

describe("sign-in (authorizeSignIn against the database)", () => {
  it("a deactivated account cannot sign in even with its right password, and the attempt is audited", async () => {
    const u = await makeUser();
    expect(await authorizeSignIn({ email: u.email, password: u.password }, "198.51.100.20")).toMatchObject({ id: String(u.id), sv: 0 });
    await db("users").where({ id: u.id }).update({ is_active: false });
    expect(await authorizeSignIn({ email: u.email, password: u.password }, "198.51.100.20")).toBeNull();
    const audit = await db("audit_events").where({ action: "sign_in_failed", entity_id: u.id });
    expect(audit).toHaveLength(1);
    expect(JSON.stringify(audit[0])).not.toContain(u.password);
  });

  it("an account whose owner has not set a password yet cannot be signed into with any password", async () => {
    const u = await makeUser();
    await db("users").where({ id: u.id }).update({ password_hash: "!unset" });
    for (const guess of ["!unset", "", "password", u.password]) expect(await authorizeSignIn({ email: u.email, password: guess }, "198.51.100.21")).toBeNull();
  });

  it("the signed session carries the account's current session version", async () => {
    const u = await makeUser();
    await db("users").where({ id: u.id }).update({ session_version: 7 });
    expect(await authorizeSignIn({ email: u.email, password: u.password }, "198.51.100.22")).toMatchObject({ sv: 7 });
  });

  it("after the free failures, even the right password waits: the delay is enforced before the password is checked", async () => {
    const u = await makeUser();
    for (let i = 0; i < perPair.freeFailures + 1; i++) expect(await authorizeSignIn({ email: u.email, password: "wrong-wrong-wrong" }, "198.51.100.23")).toBeNull();
    await expect(authorizeSignIn({ email: u.email, password: u.password }, "198.51.100.23")).rejects.toThrow(/Too many failed sign-in attempts/);
    // The owner elsewhere is not held back.
    expect(await authorizeSignIn({ email: u.email, password: u.password }, "198.51.100.24")).toMatchObject({ id: String(u.id) });
  });
});
