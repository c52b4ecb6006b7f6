import { describe, expect, it } from "vitest";
import { performance } from "node:perf_hooks";
import { BUSY_FROM, MAX_PAUSE_MS, MAX_PAUSE_PER_SLICE, eventLoopWatcher, pauseBeforeNextSlice, type LoopTimes } from "./back-off";

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
  it("reports the share of time active since its previous call, from injected readings", () => {
    // Cumulative readings in ms: 10 active of 40 (0.25), then 30 active of 30 (1), then 0 active of 50 (0).
    const readings: LoopTimes[] = [
      { idle: 100, active: 50 },
      { idle: 130, active: 60 },
      { idle: 130, active: 90 },
      { idle: 180, active: 90 },
      { idle: 180, active: 90 },
    ];
    let i = 0;
    const utilization = eventLoopWatcher(() => readings[i++]);
    expect(utilization()).toBe(0.25);
    expect(utilization()).toBe(1);
    expect(utilization()).toBe(0);
    // No time passed between two readings: nothing to report, and no NaN reaches the pause rule.
    expect(utilization()).toBe(0);
    expect(i).toBe(readings.length);
  });

  it("agrees with node:perf_hooks' own interval arithmetic on real readings", async () => {
    // Reference: performance.eventLoopUtilization(now, before) computes the same interval.
    const seen: ReturnType<typeof performance.eventLoopUtilization>[] = [];
    const utilization = eventLoopWatcher(() => {
      const r = performance.eventLoopUtilization();
      seen.push(r);
      return r;
    });
    for (let k = 0; k < 3; k++) {
      await new Promise((r) => setImmediate(r));
      const u = utilization();
      expect(u).toBeCloseTo(performance.eventLoopUtilization(seen[k + 1], seen[k]).utilization, 12);
    }
  });

  it("reports a blocked event loop as busy and, once it is left alone, as not busy", async () => {
    const utilization = eventLoopWatcher();
    // Holding the loop is active time however the OS schedules this process, so this holds under load.
    const until = Date.now() + 60;
    while (Date.now() < until); // hold the event loop
    expect(utilization()).toBeGreaterThan(0.8);
    // An idle interval on a loaded machine can still look busy (the process is descheduled while it
    // runs its few callbacks, or a collection runs): wait for an idle interval to be reported, with
    // a generous overall deadline, instead of trusting one fixed 60 ms sleep.
    utilization();
    const deadline = Date.now() + 20_000;
    let last = 1;
    while (Date.now() < deadline) {
      await new Promise((r) => setTimeout(r, 100));
      last = utilization();
      if (last < 0.5) break;
    }
    expect(last).toBeLessThan(0.5);
  }, 30_000);
});
