/**
 * Meeting times: stored as a UTC instant plus the IANA time zone the organiser chose. Zone
 * arithmetic is @date-fns/tz's (TZDate, tzOffset), over the runtime's time-zone database, so clock
 * changes are handled by the same data the browser and the operating system use.
 */
import { format } from "date-fns";
import { TZDate, tzOffset } from "@date-fns/tz";

/** True when the runtime knows this IANA time-zone name. */
export function isKnownTimeZone(tz: string): boolean {
  if (!tz || tz.length > 64) return false;
  try {
    new Intl.DateTimeFormat("en-GB", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

/** The zones offered in the form: the runtime's list, with UTC first. */
export function timeZoneChoices(): string[] {
  const all = typeof Intl.supportedValuesOf === "function" ? Intl.supportedValuesOf("timeZone") : [];
  return ["UTC", ...all.filter((z) => z !== "UTC")];
}

const WALL = "yyyy-MM-dd'T'HH:mm";

/** The wall-clock time ("2026-12-10T15:00") of an instant in a zone. */
function wallIn(instant: number, tz: string): string {
  return format(new TZDate(instant, tz), WALL);
}

/** Offset of the zone from UTC at an instant, in minutes (east positive). */
function zoneOffsetMinutes(instant: number, tz: string): number {
  return tzOffset(tz, new Date(instant));
}

type ZonedParse = { ok: true; utc: Date } | { ok: false; error: string };

/**
 * The UTC instant of a wall-clock time ("2026-12-10T15:00") in a zone. A time skipped by a clock
 * change is refused; a repeated one (clocks going back) takes the earlier of the two instants.
 */
export function zonedWallTimeToUtc(local: string, tz: string): ZonedParse {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(local);
  if (!m) return { ok: false, error: "Enter the date and time as YYYY-MM-DDTHH:MM." };
  if (!isKnownTimeZone(tz)) return { ok: false, error: "Choose a time zone from the list." };
  const [year, month, day, hour, minute] = m.slice(1).map(Number);
  const naive = Date.UTC(year, month - 1, day, hour, minute);
  const check = new Date(naive);
  if (check.getUTCFullYear() !== year || check.getUTCMonth() !== month - 1 || check.getUTCDate() !== day || hour > 23 || minute > 59)
    return { ok: false, error: "That date does not exist." };
  // Offsets on either side of the wall time; try both and keep those that map back to the wall time.
  const candidates = [...new Set([zoneOffsetMinutes(naive - 86400000, tz), zoneOffsetMinutes(naive, tz), zoneOffsetMinutes(naive + 86400000, tz)])]
    .map((off) => naive - off * 60000)
    .filter((t) => wallIn(t, tz) === local)
    .sort((a, b) => a - b);
  if (candidates.length === 0) return { ok: false, error: `${local.replace("T", " ")} does not exist in ${tz} (the clocks change then). Choose another time.` };
  return { ok: true, utc: new Date(candidates[0]) };
}

/** The wall-clock value for a datetime-local input showing `utc` in `tz`. */
export function utcToZonedInputValue(utc: Date, tz: string): string {
  return wallIn(utc.getTime(), tz);
}

function offsetLabel(minutes: number): string {
  const sign = minutes < 0 ? "-" : "+";
  const a = Math.abs(minutes);
  return `UTC${sign}${String(Math.floor(a / 60)).padStart(2, "0")}:${String(a % 60).padStart(2, "0")}`;
}

/** "Thursday 10 December 2026, 15:00 Europe/Oslo (UTC+01:00)". */
export function formatMeetingTime(utc: Date, tz: string): string {
  return `${format(new TZDate(utc.getTime(), tz), "EEEE d MMMM yyyy, HH:mm")} ${tz} (${offsetLabel(zoneOffsetMinutes(utc.getTime(), tz))})`;
}
