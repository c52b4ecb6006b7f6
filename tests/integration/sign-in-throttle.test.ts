/**
 * Sign-in throttling counts failures in MariaDB, so every web process sees the same count and a
 * restart forgets nothing (the browser test in tests/e2e/sign-in.spec.ts shows the messages).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db/knex";
import { SIGN_IN_LIMITS } from "@/lib/auth/rate-limit";
import { clearAccountFailures, recordSignInFailure, signInWaitMs } from "@/lib/auth/sign-in-throttle";
import { resetDatabase } from "./support/db";

beforeAll(resetDatabase);
afterAll(async () => {
  await db.destroy();
});

const now = Date.parse("2026-12-02T10:00:00.000Z");

describe("sign-in throttling in MariaDB", () => {
  it("blocks an account after its fifth failure in the window, from any address, until the window passes", async () => {
    const { maxFailures, windowMs } = SIGN_IN_LIMITS.perAccount;
    for (let i = 0; i < maxFailures; i++) {
      expect(await signInWaitMs("ana@test.example", `198.51.100.${i}`, now + i * 1000)).toBe(0);
      await recordSignInFailure("ana@test.example", `198.51.100.${i}`, now + i * 1000);
    }
    const at = now + maxFailures * 1000;
    expect(await signInWaitMs("ana@test.example", "198.51.100.99", at)).toBe(now + windowMs - at);
    expect(await signInWaitMs("ben@test.example", "198.51.100.99", at)).toBe(0);
    expect(await signInWaitMs("ana@test.example", "198.51.100.99", now + windowMs + 1)).toBe(0);
  });

  it("a successful sign-in clears the account's count but not the address's", async () => {
    await clearAccountFailures("ana@test.example");
    expect(await signInWaitMs("ana@test.example", "198.51.100.99", now + 6000)).toBe(0);
    expect(await db("sign_in_failures").where({ scope: "address" }).count({ n: "*" })).toEqual([{ n: SIGN_IN_LIMITS.perAccount.maxFailures }]);
  });

  it("blocks an address after its thirtieth failure, whatever the accounts", async () => {
    const { maxFailures } = SIGN_IN_LIMITS.perAddress;
    for (let i = 0; i < maxFailures; i++) await recordSignInFailure(`user${i}@test.example`, "203.0.113.7", now + i);
    expect(await signInWaitMs("new@test.example", "203.0.113.7", now + maxFailures)).toBeGreaterThan(0);
    expect(await signInWaitMs("new@test.example", "203.0.113.8", now + maxFailures)).toBe(0);
  });

  it("forgets failures older than the window as new ones arrive", async () => {
    const later = now + SIGN_IN_LIMITS.perAccount.windowMs + 60_000;
    await recordSignInFailure("cy@test.example", "192.0.2.1", later);
    const left = (await db("sign_in_failures").select("subject")) as { subject: string }[];
    expect(left.map((r) => r.subject).sort()).toEqual(["192.0.2.1", "cy@test.example"]);
  });
});
