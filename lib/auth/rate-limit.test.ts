import { describe, expect, it } from "vitest";
import { blockedForMs, tooManyAttemptsMessage } from "./rate-limit";

describe("blockedForMs", () => {
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

  it("says how long to wait, in whole minutes", () => {
    expect(tooManyAttemptsMessage(61_000)).toBe("Too many failed sign-in attempts. Try again in 2 minutes.");
    expect(tooManyAttemptsMessage(1)).toBe("Too many failed sign-in attempts. Try again in 1 minute.");
  });
});
