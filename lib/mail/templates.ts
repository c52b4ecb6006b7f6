/**
 * E-mail templates as plain functions: data in, subject and plain-text body out. Plain text only,
 * so nothing a user typed (a trial title, an agenda) can become markup in a mail client. Every
 * message says what it is, who it is for, and carries the caution. No template takes closed data:
 * DMC members get a link to the closed report in Cairn, never its content.
 */
import { CAUTION_TEXT } from "@/lib/caution";

type MailContent = { subject: string; text: string };

type PacketMailContext = {
  trialCode: string;
  trialTitle: string;
  meetingWhen: string;
  lookNumber: number;
  recipientName: string;
  senderName: string;
};

const FOOTER = (why: string) =>
  `\n\n--\nCaution. ${CAUTION_TEXT}\n\n${why} This message was sent by Cairn, the trial's interim-monitoring system; replies are not read.`;

/** One line, no control characters: a subject cannot carry a header break. */
export function oneLine(s: string, max = 250): string {
  const flat = s.replace(/[\r\n\t\u0000-\u001f\u007f]+/g, " ").replace(/\s+/g, " ").trim();
  return flat.length > max ? `${flat.slice(0, max - 1)}…` : flat;
}

export function openPacketMail(c: PacketMailContext & { packetVersion: number; attachmentName: string }): MailContent {
  return {
    subject: oneLine(`[${c.trialCode}] DMC meeting packet, open report v${c.packetVersion} (look ${c.lookNumber})`),
    text:
      `Dear ${c.recipientName},\n\n` +
      `This is the open report of the meeting packet for the DMC meeting of ${c.trialCode} (${c.trialTitle}).\n\n` +
      `Meeting: ${c.meetingWhen}\nLook reviewed: look ${c.lookNumber}\nOpen report: version ${c.packetVersion}, attached as ${c.attachmentName} (PDF)\n\n` +
      `The open report holds accrual, the look schedule, data timeliness and the recommendations recorded so far. It holds no arm-level or outcome data.\n\n` +
      `Sent by ${c.senderName} through Cairn.` +
      FOOTER("You receive this because you are on this trial as sponsor or trial coordinator."),
  };
}

export function closedNoticeMail(c: PacketMailContext & { packetVersion: number; link: string }): MailContent {
  return {
    subject: oneLine(`[${c.trialCode}] DMC meeting packet: closed report v${c.packetVersion} ready in Cairn (look ${c.lookNumber})`),
    text:
      `Dear ${c.recipientName},\n\n` +
      `The closed report for the DMC meeting of ${c.trialCode} (${c.trialTitle}) is ready. For confidentiality it is not attached: sign in to Cairn to read it.\n\n` +
      `Meeting: ${c.meetingWhen}\nLook reviewed: look ${c.lookNumber}\nClosed report: version ${c.packetVersion}\nRead it here: ${c.link}\n\n` +
      `Only DMC members and the unblinded statistician can open the closed report. Please do not forward this message.\n\n` +
      `Sent by ${c.senderName} through Cairn.` +
      FOOTER("You receive this because you are a DMC member or the unblinded statistician on this trial."),
  };
}

/**
 * How far ahead the meeting is, in words, rounded down to whole hours (whole days and hours from one
 * day on): "in 2 days and 5 hours", "in 20 hours", "within the hour". A reminder sent late (the
 * meeting was scheduled inside its reminder window, or the server was down) says the real lead time.
 */
export function leadTimeWords(msAhead: number): string {
  const hours = Math.floor(Math.max(0, msAhead) / 3_600_000);
  if (hours < 1) return "within the hour";
  const days = Math.floor(hours / 24);
  const rest = hours % 24;
  const d = `${days} day${days === 1 ? "" : "s"}`;
  const h = `${rest} hour${rest === 1 ? "" : "s"}`;
  if (days === 0) return `in ${h}`;
  return rest === 0 ? `in ${d}` : `in ${d} and ${h}`;
}

/** `msAhead` is the time from sending to the meeting; `daysBefore` the reminder day the organiser chose. */
export function reminderMail(c: Omit<PacketMailContext, "senderName"> & { daysBefore: number; msAhead: number; link: string; openAgenda: string }): MailContent {
  const planned = `${c.daysBefore} day${c.daysBefore === 1 ? "" : "s"}`;
  return {
    subject: oneLine(`[${c.trialCode}] Reminder: DMC meeting on ${c.meetingWhen}`),
    text:
      `Dear ${c.recipientName},\n\n` +
      `This is a reminder of the DMC meeting of ${c.trialCode} (${c.trialTitle}), which starts ${leadTimeWords(c.msAhead)} ` +
      `(reminders for this meeting were planned ${planned} ahead).\n\n` +
      `Meeting: ${c.meetingWhen}\nLook reviewed: look ${c.lookNumber}\nMeeting page: ${c.link}\n\n` +
      `Open session agenda:\n${c.openAgenda.trim() || "(none entered)"}` +
      FOOTER("You receive this because you are invited to this meeting."),
  };
}

export function passwordLinkMail(c: { recipientName: string; link: string; expiresAt: string; issuerName: string }): MailContent {
  return {
    subject: oneLine("Cairn: set your password"),
    text:
      `Dear ${c.recipientName},\n\n` +
      `${c.issuerName} opened a Cairn account for you (or asked for a new password to be set). Choose your password here:\n\n${c.link}\n\n` +
      `The link works once and until ${c.expiresAt}. Your password is yours alone: nobody at Cairn, administrators included, will ever ask for it. ` +
      `It is also the password you type to sign records electronically.\n\n` +
      `If you did not expect this message, tell your trial's administrator.` +
      FOOTER("You receive this because an account in Cairn carries your e-mail address."),
  };
}

export function passwordChangedMail(c: { recipientName: string; when: string; how: "link" | "account page" }): MailContent {
  return {
    subject: oneLine("Cairn: your password was changed"),
    text:
      `Dear ${c.recipientName},\n\n` +
      `The password of your Cairn account was ${c.how === "link" ? "set through a set-password link" : "changed on the account page"} on ${c.when}. Every session of the account was signed out.\n\n` +
      `If this was not you, tell your trial's administrator at once: someone else may be able to sign in, and sign, as you.` +
      FOOTER("You receive this because an account in Cairn carries your e-mail address."),
  };
}
