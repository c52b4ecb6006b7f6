import { describe, expect, it } from "vitest";
import { FailureWindow, tooManyAttemptsMessage } from "./rate-limit";

describe("FailureWindow", () => {
  it("allows up to maxFailures failures in the window, then blocks until the oldest one ages out", () => {
    let t = 0;
    const w = new FailureWindow({ maxFailures: 3, windowMs: 1000 }, () => t);
    for (let i = 0; i < 3; i++) {
      expect(w.blockedFor("a")).toBe(0);
      w.recordFailure("a");
      t += 100;
    }
    // failures at 0, 100, 200; now 300: blocked until 0 + 1000
    expect(w.blockedFor("a")).toBe(700);
    expect(w.blockedFor("b")).toBe(0);
    t = 1001;
    expect(w.blockedFor("a")).toBe(0);
  });

  it("a successful sign-in resets the account's count", () => {
    const w = new FailureWindow({ maxFailures: 1, windowMs: 1000 }, () => 0);
    w.recordFailure("a");
    expect(w.blockedFor("a")).toBeGreaterThan(0);
    w.reset("a");
    expect(w.blockedFor("a")).toBe(0);
  });

  it("says how long to wait, in whole minutes", () => {
    expect(tooManyAttemptsMessage(61_000)).toBe("Too many failed sign-in attempts. Try again in 2 minutes.");
    expect(tooManyAttemptsMessage(1)).toBe("Too many failed sign-in attempts. Try again in 1 minute.");
  });
});
