import { describe, expect, it } from "vitest";
import { formatMeetingTime, isKnownTimeZone, utcToZonedInputValue, zonedWallTimeToUtc } from "./meeting-time";

// Offsets below are facts of the IANA time-zone database (tzdata), which Node's Intl carries:
// Europe/Oslo is UTC+1 in winter and UTC+2 from the last Sunday of March 01:00 UTC; America/New_York
// is UTC-5 in winter and falls back on the first Sunday of November 2026 (1 November).
describe("zonedWallTimeToUtc", () => {
  it("converts a winter time in Oslo (UTC+1) to UTC", () => {
    const r = zonedWallTimeToUtc("2026-12-10T15:00", "Europe/Oslo");
    expect(r).toEqual({ ok: true, utc: new Date("2026-12-10T14:00:00Z") });
  });
  it("converts a summer time in Oslo (UTC+2) to UTC", () => {
    const r = zonedWallTimeToUtc("2026-07-01T09:30", "Europe/Oslo");
    expect(r).toEqual({ ok: true, utc: new Date("2026-07-01T07:30:00Z") });
  });
  it("refuses a wall time skipped when clocks go forward (Oslo, 29 March 2026 02:30)", () => {
    const r = zonedWallTimeToUtc("2026-03-29T02:30", "Europe/Oslo");
    expect(r.ok).toBe(false);
  });
  it("takes the earlier instant of a repeated wall time (New York, 1 November 2026 01:30)", () => {
    const r = zonedWallTimeToUtc("2026-11-01T01:30", "America/New_York");
    expect(r).toEqual({ ok: true, utc: new Date("2026-11-01T05:30:00Z") });
  });
  it("refuses unknown zones, malformed input and impossible dates", () => {
    expect(zonedWallTimeToUtc("2026-12-10T15:00", "Mars/Olympus").ok).toBe(false);
    expect(zonedWallTimeToUtc("10/12/2026 15:00", "UTC").ok).toBe(false);
    expect(zonedWallTimeToUtc("2026-02-30T10:00", "UTC").ok).toBe(false);
  });
  it("round-trips through the input value", () => {
    const utc = new Date("2026-12-10T14:00:00Z");
    expect(utcToZonedInputValue(utc, "Europe/Oslo")).toBe("2026-12-10T15:00");
    expect(utcToZonedInputValue(utc, "Asia/Kolkata")).toBe("2026-12-10T19:30");
  });
});

describe("formatMeetingTime", () => {
  it("shows the wall time, the zone and its offset", () => {
    expect(formatMeetingTime(new Date("2026-12-10T14:00:00Z"), "Europe/Oslo")).toBe("Thursday 10 December 2026, 15:00 Europe/Oslo (UTC+01:00)");
    expect(formatMeetingTime(new Date("2026-12-10T14:00:00Z"), "Asia/Kolkata")).toBe("Thursday 10 December 2026, 19:30 Asia/Kolkata (UTC+05:30)");
  });
  it("knows UTC and refuses an empty zone", () => {
    expect(isKnownTimeZone("UTC")).toBe(true);
    expect(isKnownTimeZone("")).toBe(false);
  });
});
