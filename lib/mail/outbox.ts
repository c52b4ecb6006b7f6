import "server-only";
/**
 * Writes the messages to send (packet mails, reminders) into email_messages, in one transaction
 * with its audit row. Delivery is separate (delivery.ts), so a page can respond before any SMTP
 * conversation starts.
 */
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import type { PublicUser, TrialRow } from "@/db/types";
import { fetchTrialRecipients, insertEmails, type NewEmail } from "@/db/queries/emails";
import { fetchLatestPacket } from "@/db/queries/packets";
import { claimReminder, fetchAttendees, fetchMeeting, fetchMeetingsDueForReminder } from "@/db/queries/meetings";
import { fetchTrial } from "@/db/queries/trials";
import { config } from "@/lib/config";
import { HttpError } from "@/lib/http";
import { formatMeetingTime } from "@/lib/packets/meeting-time";
import { closedNoticeMail, openPacketMail, reminderMail } from "./templates";

/** Roles that receive the open report as an attachment, and roles that get a link to the closed one. */
const OPEN_ATTACHMENT_ROLES = ["coordinator", "sponsor"] as const;
const CLOSED_LINK_ROLES = ["dmc_member", "unblinded_statistician"] as const;

function meetingLink(trialId: number, meetingId: number): string {
  return `${config.appUrl().replace(/\/$/, "")}/trials/${trialId}/meetings/${meetingId}#packets`;
}

type QueuedPacketMail = { ids: number[]; openVersion: number; closedVersion: number | null; recipients: number };

/**
 * Records the packet e-mails of a meeting: the latest open report attached for sponsor and
 * coordinator; a link to the latest closed report for DMC members and the unblinded statistician.
 * A person holding roles of both groups gets both messages.
 */
export async function queuePacketMail(trial: TrialRow, meetingId: number, sender: PublicUser, now = new Date()): Promise<QueuedPacketMail> {
  const meeting = await fetchMeeting(trial.id, meetingId);
  if (!meeting) throw new HttpError(404, "That meeting was not found.");
  if (meeting.status === "cancelled") throw new HttpError(409, "This meeting was cancelled; its packet cannot be sent.");
  const [openPacket, closedPacket, members] = await Promise.all([fetchLatestPacket(meetingId, "open"), fetchLatestPacket(meetingId, "closed"), fetchTrialRecipients(trial.id)]);
  if (!openPacket) throw new HttpError(409, "Generate the packet before sending it.");
  const base = {
    trialCode: trial.code,
    trialTitle: trial.title,
    meetingWhen: formatMeetingTime(new Date(meeting.scheduled_at), meeting.time_zone),
    lookNumber: meeting.lookNumber,
    senderName: sender.name,
  };
  const emails: NewEmail[] = [];
  const seen = new Set<string>();
  for (const m of members) {
    const openKind = (OPEN_ATTACHMENT_ROLES as readonly string[]).includes(m.role);
    const closedKind = (CLOSED_LINK_ROLES as readonly string[]).includes(m.role);
    if (openKind && !seen.has(`open:${m.userId}`)) {
      seen.add(`open:${m.userId}`);
      const attachmentName = `${trial.code}-open-report-v${openPacket.version}.pdf`;
      const c = openPacketMail({ ...base, recipientName: m.name, packetVersion: openPacket.version, attachmentName });
      emails.push({ trialId: trial.id, meetingId, packetId: openPacket.id, toUserId: m.userId, toAddress: m.email, subject: c.subject, kind: "packet_open", bodyText: c.text, createdBy: sender.id });
    }
    if (closedKind && closedPacket && !seen.has(`closed:${m.userId}`)) {
      seen.add(`closed:${m.userId}`);
      const c = closedNoticeMail({ ...base, recipientName: m.name, packetVersion: closedPacket.version, link: meetingLink(trial.id, meetingId) });
      emails.push({ trialId: trial.id, meetingId, packetId: closedPacket.id, toUserId: m.userId, toAddress: m.email, subject: c.subject, kind: "packet_closed_notice", bodyText: c.text, createdBy: sender.id });
    }
  }
  if (emails.length === 0) throw new HttpError(409, "Nobody on this trial holds a role that receives the packet.");
  const ids = await writeTransaction(async (tx) => {
    const ids = await insertEmails(tx, emails, now);
    await appendAudit(tx, {
      actorUserId: sender.id,
      actorEmail: sender.email,
      trialId: trial.id,
      action: "packet_mail_queued",
      entityType: "meeting",
      entityId: meetingId,
      visibility: "open",
      newValues: { openVersion: openPacket.version, closedVersion: closedPacket?.version ?? null, messages: emails.map((e, i) => ({ id: ids[i], to: e.toAddress, kind: e.kind })) },
    });
    return ids;
  });
  return { ids, openVersion: openPacket.version, closedVersion: closedPacket?.version ?? null, recipients: new Set(emails.map((e) => e.toAddress)).size };
}

/**
 * Records reminders for every scheduled meeting whose reminder window has opened (optionally of
 * one trial). Each meeting is claimed first, so a reminder goes out once even if two callers race.
 */
export async function queueDueReminders(opts: { now?: Date; trialId?: number; actor?: PublicUser | null } = {}): Promise<number[]> {
  const now = opts.now ?? new Date();
  const due = await fetchMeetingsDueForReminder(now, opts.trialId);
  const all: number[] = [];
  for (const m of due) {
    const trial = await fetchTrial(m.trial_id);
    const full = await fetchMeeting(m.trial_id, m.id);
    if (!trial || !full) continue;
    const attendees = await fetchAttendees(m.id);
    const when = formatMeetingTime(new Date(m.scheduled_at), m.time_zone);
    const ids = await writeTransaction(async (tx) => {
      if (!(await claimReminder(tx, m.id, now))) return [];
      const emails: NewEmail[] = attendees.map((a) => {
        const c = reminderMail({ trialCode: trial.code, trialTitle: trial.title, meetingWhen: when, lookNumber: full.lookNumber, recipientName: a.name, daysBefore: m.reminder_days_before, msAhead: new Date(m.scheduled_at).getTime() - now.getTime(), link: meetingLink(trial.id, m.id), openAgenda: m.open_agenda });
        return { trialId: trial.id, meetingId: m.id, packetId: null, toUserId: a.userId, toAddress: a.email, subject: c.subject, kind: "meeting_reminder", bodyText: c.text, createdBy: opts.actor?.id ?? null };
      });
      const ids = emails.length ? await insertEmails(tx, emails, now) : [];
      await appendAudit(tx, {
        actorUserId: opts.actor?.id ?? null,
        actorEmail: opts.actor?.email ?? "cairn-reminders",
        trialId: trial.id,
        action: "meeting_reminder_queued",
        entityType: "meeting",
        entityId: m.id,
        visibility: "open",
        newValues: { recipients: emails.map((e) => e.toAddress), daysBefore: m.reminder_days_before, hoursAhead: Math.floor((new Date(m.scheduled_at).getTime() - now.getTime()) / 3_600_000) },
      });
      return ids;
    });
    all.push(...ids);
  }
  return all;
}
