import "server-only";
/** DMC meetings and their attendees. Open information only: no arm-level data, and not the closed agenda (closed.ts). */
import { blindDb, db, type Tx } from "../knex";
import type { MeetingRow, MeetingStatus, TrialRole } from "../types";

/** Every meetings column but closed_agenda (closed text, db/classification.ts). */
const MEETING_OPEN_COLUMNS = ["id", "trial_id", "analysis_id", "scheduled_at", "time_zone", "open_agenda", "reminder_days_before", "reminder_sent_at", "status", "row_version", "created_by", "created_at", "updated_at"] as const;
const m = (c: string) => `m.${c}`;

export type MeetingListing = MeetingRow & { lookNumber: number; analysisStatus: string; attendeeCount: number };

export async function fetchMeetings(trialId: number, tx: Tx = blindDb): Promise<MeetingListing[]> {
  return tx("meetings as m")
    .join("analyses as a", "a.id", "m.analysis_id")
    .where("m.trial_id", trialId)
    .select(
      ...MEETING_OPEN_COLUMNS.map(m),
      "a.look_number as lookNumber",
      "a.status as analysisStatus",
      tx("meeting_attendees as ma").whereRaw("ma.meeting_id = m.id").count("*").as("attendeeCount"),
    )
    .orderBy("m.scheduled_at", "desc");
}

export async function fetchMeeting(trialId: number, meetingId: number, tx: Tx = blindDb): Promise<(MeetingRow & { lookNumber: number }) | undefined> {
  return tx("meetings as m")
    .join("analyses as a", "a.id", "m.analysis_id")
    .where({ "m.id": meetingId, "m.trial_id": trialId })
    .first(...MEETING_OPEN_COLUMNS.map(m), "a.look_number as lookNumber");
}

type AttendeeListing = { userId: number; name: string; email: string; attended: boolean | null; roles: TrialRole[] };

export async function fetchAttendees(meetingId: number, tx: Tx = blindDb): Promise<AttendeeListing[]> {
  const rows = await tx("meeting_attendees as ma")
    .join("meetings as m", "m.id", "ma.meeting_id")
    .join("users as u", "u.id", "ma.user_id")
    .leftJoin("trial_memberships as tm", function () {
      this.on("tm.user_id", "=", "ma.user_id").andOn("tm.trial_id", "=", "m.trial_id");
    })
    .where("ma.meeting_id", meetingId)
    .select("ma.user_id as userId", "u.name", "u.email", "ma.attended", "tm.role")
    .orderBy(["u.name", "tm.role"]);
  const byUser = new Map<number, AttendeeListing>();
  for (const r of rows as Array<{ userId: number; name: string; email: string; attended: number | null; role: TrialRole | null }>) {
    const a = byUser.get(r.userId) ?? { userId: r.userId, name: r.name, email: r.email, attended: r.attended === null ? null : Boolean(r.attended), roles: [] };
    if (r.role) a.roles.push(r.role);
    byUser.set(r.userId, a);
  }
  return [...byUser.values()];
}

type NewMeeting = {
  trialId: number;
  analysisId: number;
  scheduledAt: Date;
  timeZone: string;
  openAgenda: string;
  closedAgenda: string;
  reminderDaysBefore: number;
  createdBy: number;
  attendeeUserIds: number[];
};

/** Inserts a meeting and its invitees; the caller owns the transaction and the audit row. */
export async function insertMeeting(tx: Tx, m: NewMeeting): Promise<number> {
  const [id] = await tx("meetings").insert({
    trial_id: m.trialId,
    analysis_id: m.analysisId,
    scheduled_at: m.scheduledAt,
    time_zone: m.timeZone,
    open_agenda: m.openAgenda,
    closed_agenda: m.closedAgenda,
    reminder_days_before: m.reminderDaysBefore,
    created_by: m.createdBy,
  });
  if (m.attendeeUserIds.length) await tx("meeting_attendees").insert(m.attendeeUserIds.map((u) => ({ meeting_id: id, user_id: u })));
  return id;
}

/** Records who attended; users not listed as attended are recorded absent. Returns false on a stale row version. */
export async function recordAttendance(tx: Tx, meetingId: number, rowVersion: number, attendedUserIds: number[]): Promise<boolean> {
  const n = await tx("meetings")
    .where({ id: meetingId, row_version: rowVersion })
    .update({ status: "held" satisfies MeetingStatus, row_version: rowVersion + 1, updated_at: new Date() });
  if (n !== 1) return false;
  await tx("meeting_attendees").where({ meeting_id: meetingId }).update({ attended: false });
  if (attendedUserIds.length) await tx("meeting_attendees").where({ meeting_id: meetingId }).whereIn("user_id", attendedUserIds).update({ attended: true });
  return true;
}

export async function updateMeetingStatus(tx: Tx, meetingId: number, rowVersion: number, status: MeetingStatus): Promise<boolean> {
  const n = await tx("meetings").where({ id: meetingId, row_version: rowVersion }).update({ status, row_version: rowVersion + 1, updated_at: new Date() });
  return n === 1;
}

/**
 * Scheduled meetings whose reminder window has opened (now >= scheduled_at - reminder_days_before
 * days), that have not started and whose reminder has not gone out. Optionally one trial only.
 */
export async function fetchMeetingsDueForReminder(now: Date, trialId?: number, tx: Tx = db): Promise<MeetingRow[]> {
  const q = tx("meetings")
    .where({ status: "scheduled" })
    .whereNull("reminder_sent_at")
    .where("scheduled_at", ">", now)
    .whereRaw("DATE_SUB(scheduled_at, INTERVAL reminder_days_before DAY) <= ?", [now]);
  if (trialId !== undefined) q.where({ trial_id: trialId });
  return q.select(MEETING_OPEN_COLUMNS).orderBy("scheduled_at");
}

/** Marks a reminder as sent only if nobody else did first (two senders cannot both remind). */
export async function claimReminder(tx: Tx, meetingId: number, now: Date): Promise<boolean> {
  const n = await tx("meetings").where({ id: meetingId }).whereNull("reminder_sent_at").update({ reminder_sent_at: now });
  return n === 1;
}
