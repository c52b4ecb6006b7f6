import { describe, expect, it } from "vitest";
import { scheduleMeetingSchema, scheduleFormValues } from "./schemas";

function form(values: Record<string, string | string[]>): FormData {
  const f = new FormData();
  for (const [k, v] of Object.entries(values)) for (const x of Array.isArray(v) ? v : [v]) f.append(k, x);
  return f;
}
const good = { analysisId: "4", scheduledLocal: "2026-12-10T15:00", timeZone: "Europe/Oslo", attendeeIds: ["2", "3"], openAgenda: "A", closedAgenda: "B", reminderDaysBefore: "3" };

describe("scheduleMeetingSchema", () => {
  it("accepts a complete form, with repeated attendee fields", () => {
    const r = scheduleMeetingSchema.safeParse(scheduleFormValues(form(good)));
    expect(r.success && r.data).toEqual({ analysisId: 4, scheduledLocal: "2026-12-10T15:00", timeZone: "Europe/Oslo", attendeeIds: [2, 3], openAgenda: "A", closedAgenda: "B", reminderDaysBefore: 3 });
  });
  it("names each bad field", () => {
    const r = scheduleMeetingSchema.safeParse(scheduleFormValues(form({ ...good, analysisId: "", timeZone: "Nowhere/Else", reminderDaysBefore: "90", attendeeIds: ["2", "2"], scheduledLocal: "tomorrow" })));
    expect(r.success).toBe(false);
    const fields = r.success ? {} : r.error.flatten().fieldErrors;
    expect(Object.keys(fields).sort()).toEqual(["analysisId", "attendeeIds", "reminderDaysBefore", "scheduledLocal", "timeZone"]);
  });
  it("refuses agendas over 5000 characters", () => {
    expect(scheduleMeetingSchema.safeParse(scheduleFormValues(form({ ...good, openAgenda: "x".repeat(5001) }))).success).toBe(false);
  });
});
