import { describe, expect, it } from "vitest";
import { backoffForMs, blockedForMs, SIGN_IN_LIMITS, tooManyAttemptsMessage } from "./rate-limit";

describe("blockedForMs (the per-address limit)", () => {
  const rule = { maxFailures: 3, windowMs: 1000 };

  it("allows up to maxFailures failures in the window, then blocks until the oldest one ages out", () => {
    expect(blockedForMs([], rule, 0)).toBe(0);
    expect(blockedForMs([0, 100], rule, 200)).toBe(0);
    // failures at 0, 100, 200; now 300: blocked until 0 + 1000
    expect(blockedForMs([0, 100, 200], rule, 300)).toBe(700);
    expect(blockedForMs([0, 100, 200], rule, 1001)).toBe(0);
  });

  it("counts only the last maxFailures failures when more are on record", () => {
    // five failures; the third-newest (at 300) decides: blocked until 1300
    expect(blockedForMs([100, 200, 300, 400, 500], rule, 600)).toBe(700);
  });

  it("ignores failures that have left the window, however many", () => {
    expect(blockedForMs([0, 1, 2, 3, 4, 5], rule, 2000)).toBe(0);
  });
});

describe("backoffForMs (the per account-and-address delay)", () => {
  const rule = { windowMs: 60_000, freeFailures: 3, baseDelayMs: 1000, maxDelayMs: 8000 };

  it("leaves the first free failures without delay", () => {
    expect(backoffForMs([], rule, 0)).toBe(0);
    expect(backoffForMs([0, 10, 20], rule, 21)).toBe(0);
  });

  it("doubles the delay with each failure past the free ones, counted from the latest failure, up to the cap", () => {
    // Worked by hand from the rule: 4th failure 1 s, 5th 2 s, 6th 4 s, 7th 8 s, 8th capped at 8 s.
    const at = (n: number) => Array.from({ length: n }, (_, i) => i * 10);
    expect(backoffForMs(at(4), rule, 30)).toBe(1000);
    expect(backoffForMs(at(5), rule, 40)).toBe(2000);
    expect(backoffForMs(at(6), rule, 50)).toBe(4000);
    expect(backoffForMs(at(7), rule, 60)).toBe(8000);
    expect(backoffForMs(at(8), rule, 70)).toBe(8000);
    // Part of the delay already waited.
    expect(backoffForMs(at(5), rule, 1540)).toBe(500);
    expect(backoffForMs(at(5), rule, 2040)).toBe(0);
  });

  it("forgets failures outside the window", () => {
    expect(backoffForMs([0, 1, 2, 3, 4, 5], rule, 70_000)).toBe(0);
  });

  it("never locks anyone out for long: the real user waits at most the cap however many failures", () => {
    const many = Array.from({ length: 10_000 }, (_, i) => i);
    expect(backoffForMs(many, SIGN_IN_LIMITS.perPair, 10_000)).toBeLessThanOrEqual(SIGN_IN_LIMITS.perPair.maxDelayMs);
    expect(Number.isFinite(backoffForMs(many, SIGN_IN_LIMITS.perPair, 10_000))).toBe(true);
  });
});

describe("tooManyAttemptsMessage", () => {
  it("says how long to wait, in seconds under a minute and whole minutes above", () => {
    expect(tooManyAttemptsMessage(61_000)).toBe("Too many failed sign-in attempts. Try again in 2 minutes.");
    expect(tooManyAttemptsMessage(60_000)).toBe("Too many failed sign-in attempts. Try again in 1 minute.");
    expect(tooManyAttemptsMessage(1)).toBe("Too many failed sign-in attempts. Try again in 1 second.");
    expect(tooManyAttemptsMessage(2001, "password")).toBe("Too many failed password attempts. Try again in 3 seconds.");
  });
});
