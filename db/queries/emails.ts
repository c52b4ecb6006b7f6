import "server-only";
/** The record of every e-mail Cairn sends, and the delivery queue built on it. */
import { db, type Tx } from "../knex";
import type { EmailKind, EmailMessageRow } from "../types";

export type NewEmail = {
  trialId: number | null;
  meetingId: number | null;
  packetId: number | null;
  toUserId: number | null;
  toAddress: string;
  subject: string;
  kind: EmailKind;
  bodyText: string;
  createdBy: number | null;
};

export async function insertEmails(tx: Tx, emails: NewEmail[], now: Date): Promise<number[]> {
  const ids: number[] = [];
  // One insert per row: MariaDB reports only the first id of a multi-row insert.
  for (const e of emails) {
    const [id] = await tx("email_messages").insert({
      trial_id: e.trialId,
      meeting_id: e.meetingId,
      packet_id: e.packetId,
      to_user_id: e.toUserId,
      to_address: e.toAddress,
      subject: e.subject,
      kind: e.kind,
      body_text: e.bodyText,
      status: "queued",
      attempts: 0,
      next_attempt_at: now,
      created_by: e.createdBy,
    });
    ids.push(id);
  }
  return ids;
}

export async function fetchEmail(id: number, tx: Tx = db): Promise<EmailMessageRow | undefined> {
  return tx<EmailMessageRow>("email_messages").where({ id }).first();
}

type EmailListing = Omit<EmailMessageRow, "body_text"> & { packetVersion: number | null; packetAudience: string | null };

export async function fetchEmailsForMeeting(meetingId: number, tx: Tx = db): Promise<EmailListing[]> {
  return tx("email_messages as e")
    .leftJoin("packets as p", "p.id", "e.packet_id")
    .where("e.meeting_id", meetingId)
    .select(
      "e.id", "e.trial_id", "e.meeting_id", "e.packet_id", "e.to_user_id", "e.to_address", "e.subject", "e.kind", "e.status",
      "e.attempts", "e.last_error", "e.next_attempt_at", "e.sent_at", "e.smtp_message_id", "e.created_by", "e.created_at",
      "p.version as packetVersion", "p.audience as packetAudience",
    )
    .orderBy("e.id", "desc");
}

/** Ids of messages whose next try is due: queued ones, and "sending" ones whose lease ran out (a crashed sender). */
export async function fetchDueEmailIds(now: Date, limit = 50, tx: Tx = db): Promise<number[]> {
  const rows = await tx("email_messages").whereIn("status", ["queued", "sending"]).where("next_attempt_at", "<=", now).orderBy("next_attempt_at").limit(limit).select("id");
  return rows.map((r: { id: number }) => r.id);
}

/**
 * Claims a due message for one attempt: status "sending", attempts + 1, and a lease until
 * `leaseUntil`. Only one sender can win the claim; returns the new attempt number or null.
 */
export async function claimEmail(tx: Tx, id: number, now: Date, leaseUntil: Date): Promise<number | null> {
  const n = await tx("email_messages")
    .where({ id })
    .whereIn("status", ["queued", "sending"])
    .where("next_attempt_at", "<=", now)
    .update({ status: "sending", attempts: tx.raw("attempts + 1"), next_attempt_at: leaseUntil });
  if (n !== 1) return null;
  const row = await tx("email_messages").where({ id }).first("attempts");
  return Number(row.attempts);
}

export async function markEmailSent(tx: Tx, id: number, at: Date, smtpMessageId: string | null): Promise<void> {
  await tx("email_messages").where({ id }).update({ status: "sent", sent_at: at, last_error: null, next_attempt_at: null, smtp_message_id: smtpMessageId });
}

/** A failed attempt: queued again for `retryAt`, or failed for good when `retryAt` is null. */
export async function markEmailAttemptFailed(tx: Tx, id: number, error: string, retryAt: Date | null): Promise<void> {
  await tx("email_messages")
    .where({ id })
    .update({ status: retryAt ? "queued" : "failed", last_error: error.slice(0, 2000), next_attempt_at: retryAt });
}

/** Puts a failed message back in the queue for a fresh round of tries (a person asked for it). */
export async function requeueFailedEmail(tx: Tx, id: number, now: Date): Promise<boolean> {
  const n = await tx("email_messages").where({ id, status: "failed" }).update({ status: "queued", attempts: 0, next_attempt_at: now });
  return n === 1;
}

/** Members of a trial with their e-mail addresses, by role (open columns only). */
export async function fetchTrialRecipients(trialId: number, tx: Tx = db): Promise<Array<{ userId: number; name: string; email: string; role: string }>> {
  return tx("trial_memberships as m")
    .join("users as u", "u.id", "m.user_id")
    .where("m.trial_id", trialId)
    .where("u.is_active", true)
    .select("u.id as userId", "u.name", "u.email", "m.role")
    .orderBy(["u.name", "m.role"]);
}
