import { rowVersionSchema } from "@/lib/schema-pieces";
import { z } from "zod";
import { isKnownTimeZone } from "@/lib/packets/meeting-time";

const id = (msg: string) => z.coerce.number({ message: msg }).int(msg).positive(msg).max(2_147_483_647, msg);

export const scheduleMeetingSchema = z.object({
  analysisId: id("Choose the analysis this meeting reviews."),
  scheduledLocal: z.string().trim().regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/, "Enter the date and time of the meeting."),
  timeZone: z.string().trim().min(1, "Choose a time zone.").refine(isKnownTimeZone, "Choose a time zone from the list."),
  attendeeIds: z.array(id("That attendee is not valid.")).max(100, "At most 100 attendees.").refine((a) => new Set(a).size === a.length, "An attendee is listed twice."),
  openAgenda: z.string().max(5000, "The open-session agenda can be at most 5000 characters."),
  closedAgenda: z.string().max(5000, "The closed-session agenda can be at most 5000 characters."),
  reminderDaysBefore: z.coerce.number({ message: "Enter a whole number of days." }).int("Enter a whole number of days.").min(0, "Enter 0 to 60 days.").max(60, "Enter 0 to 60 days."),
});


/** Reads the schedule form (checkboxes arrive as repeated fields). */
export function scheduleFormValues(form: FormData) {
  return {
    analysisId: form.get("analysisId") ?? "",
    scheduledLocal: form.get("scheduledLocal") ?? "",
    timeZone: form.get("timeZone") ?? "",
    attendeeIds: form.getAll("attendeeIds"),
    openAgenda: form.get("openAgenda") ?? "",
    closedAgenda: form.get("closedAgenda") ?? "",
    reminderDaysBefore: form.get("reminderDaysBefore") ?? "",
  };
}

export const meetingRefSchema = z.object({ trialId: id("Unknown trial."), meetingId: id("Unknown meeting.") });
export const attendanceSchema = meetingRefSchema.extend({ rowVersion: rowVersionSchema, attendedIds: z.array(id("That attendee is not valid.")).max(100) });
export const emailRefSchema = z.object({ trialId: id("Unknown trial."), emailId: id("Unknown message.") });

export type MeetingFormState = { ok?: string; error?: string; fieldErrors?: Record<string, string[] | undefined>; meetingId?: number };
