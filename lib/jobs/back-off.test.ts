import { describe, expect, it } from "vitest";
import { BUSY_FROM, MAX_PAUSE_MS, MAX_PAUSE_PER_SLICE, eventLoopWatcher, pauseBeforeNextSlice } from "./back-off";

describe("pauseBeforeNextSlice", () => {
  it("does not pause while the request thread has room", () => {
    expect(pauseBeforeNextSlice(0, 20)).toBe(0);
    expect(pauseBeforeNextSlice(BUSY_FROM, 20)).toBe(0);
    expect(pauseBeforeNextSlice(Number.NaN, 20)).toBe(0);
  });

  it("grows linearly to MAX_PAUSE_PER_SLICE slices at a fully busy thread", () => {
    expect(pauseBeforeNextSlice(1, 20)).toBe(MAX_PAUSE_PER_SLICE * 20);
    expect(pauseBeforeNextSlice((1 + BUSY_FROM) / 2, 20)).toBe(Math.round((MAX_PAUSE_PER_SLICE * 20) / 2));
    // The job's share of a core at full busyness: slice / (slice + pause).
    expect(20 / (20 + pauseBeforeNextSlice(1, 20))).toBeCloseTo(1 / (1 + MAX_PAUSE_PER_SLICE), 12);
  });

  it("caps the pause so progress keeps moving", () => {
    expect(pauseBeforeNextSlice(1, 60_000)).toBe(MAX_PAUSE_MS);
  });
});

describe("eventLoopWatcher", () => {
  it("reports a blocked event loop as busy and an idle one as not", async () => {
    const utilization = eventLoopWatcher();
    const until = Date.now() + 60;
    while (Date.now() < until); // hold the event loop
    expect(utilization()).toBeGreaterThan(0.8);
    await new Promise((r) => setTimeout(r, 60));
    expect(utilization()).toBeLessThan(0.5);
  });
});
