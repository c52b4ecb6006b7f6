import "server-only";
/**
 * The committee's recommendation letter to the sponsor. Its content is built from open facts only
 * (trial, look, meeting date, the recorded decision, the chair's name, the caution): no counts,
 * no votes, no tally, no rationale. It imports no closed module, so nothing closed can reach it.
 * Signed by the chair (password again), stored as a versioned PDF with the SHA-256 of its
 * content, and e-mailed to the sponsor's contacts through the mail outbox with the PDF attached.
 */
import { createHash } from "node:crypto";
import PDFDocument from "pdfkit";
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { insertSignature } from "@/db/queries/signatures";
import { fetchTrialRecipients, insertEmails, type NewEmail } from "@/db/queries/emails";
import { fetchCommittee, fetchLetters, fetchMeetingRecommendationOpen, insertLetterVersion } from "@/db/queries/committee";
import { lockMeetingRow } from "@/db/queries/packets";
import type { RecommendationDecision, TrialRow } from "@/db/types";
import { assertCapability, type TrialAccess } from "@/lib/auth";
import { confirmSigner } from "@/lib/auth/signature";
import { CAUTION_TEXT } from "@/lib/caution";
import { DECISION_LABELS } from "@/lib/format";
import { conflict } from "@/lib/http";
import { formatMeetingTime } from "@/lib/packets/meeting-time";
import { pdfSafeText } from "@/lib/packets/document";
import { oneLine } from "@/lib/mail/templates";
import { meetingOf, requireChair } from "./service";
import { letterSchema, letterSendSchema } from "./schemas";

type LetterContent = {
  trialCode: string;
  trialTitle: string;
  sponsorName: string;
  lookNumber: number;
  meetingWhen: string;
  decision: RecommendationDecision;
  decisionLabel: string;
  recordedOn: string;
  chairName: string;
  caution: string;
};

/** The letter's paragraphs, in order (the PDF draws them; tests read them back with pdftotext). */
function letterParagraphs(c: LetterContent): string[] {
  return [
    `To: ${c.sponsorName}`,
    `Trial: ${c.trialCode} - ${c.trialTitle}`,
    `Interim analysis: look ${c.lookNumber}`,
    `Meeting of the data monitoring committee: ${c.meetingWhen}`,
    `Recommendation recorded on: ${c.recordedOn}`,
    `The data monitoring committee recommends: ${c.decisionLabel}.`,
    "This letter reports the committee's recommendation only. The interim data, the committee's deliberations and its votes stay confidential to the committee and the unblinded statistician.",
    `Signed for the committee by its chair, ${c.chairName}.`,
    `Caution. ${c.caution}`,
  ];
}

function letterContentHash(c: LetterContent): string {
  const keys = Object.keys(c).sort() as (keyof LetterContent)[];
  return createHash("sha256").update(JSON.stringify(keys.map((k) => [k, c[k]]))).digest("hex");
}

async function renderLetterPdf(c: LetterContent, meta: { version: number; contentHash: string; signedAt: Date }): Promise<{ pdf: Buffer; pageCount: number }> {
  const doc = new PDFDocument({
    size: "A4",
    margins: { top: 64, bottom: 70, left: 60, right: 60 },
    info: { Title: pdfSafeText(`Recommendation of the data monitoring committee: ${c.trialCode}`), Author: "Cairn", CreationDate: meta.signedAt, ModDate: meta.signedAt },
  });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("data", (b: Buffer) => chunks.push(b));
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });
  const width = doc.page.width - 120;
  doc.font("Helvetica-Bold").fontSize(16).fillColor("#1f1d19").text("Recommendation of the data monitoring committee", { width });
  doc.moveDown(1);
  const paras = letterParagraphs(c);
  for (const [i, p] of paras.entries()) {
    const isDecision = i === 5;
    const isCaution = i === paras.length - 1;
    doc.font(isDecision ? "Helvetica-Bold" : "Helvetica").fontSize(isDecision ? 13 : 11).fillColor(isCaution ? "#7a4705" : "#1f1d19").text(pdfSafeText(p), { width });
    doc.moveDown(0.6);
  }
  doc.moveDown(1);
  doc.font("Helvetica").fontSize(8).fillColor("#5e584c").text(`Letter version ${meta.version}. Content SHA-256 ${meta.contentHash}. Electronically signed ${meta.signedAt.toISOString().slice(0, 16).replace("T", " ")} UTC in Cairn.`, { width });
  doc.end();
  return { pdf: await done, pageCount: 1 };
}

const day = (d: Date | string) => new Date(d).toISOString().slice(0, 10);

/** The chair signs the letter for the committee's current recommendation made at this meeting; a new version only when the content changed. */
export async function signRecommendationLetter(access: TrialAccess, raw: unknown, now = new Date()): Promise<{ id: number; version: number; created: boolean }> {
  assertCapability(access, "recordRecommendation");
  const input = letterSchema.parse(raw);
  const meeting = await meetingOf(access, input.meetingId);
  const committee = await fetchCommittee(access.trial.id);
  const chair = requireChair(access, committee);
  const rec = await fetchMeetingRecommendationOpen(meeting.id);
  if (!rec) throw conflict("The committee's recommendation for the look of this meeting has not been recorded yet.");
  const content = letterContent(access.trial, { lookNumber: meeting.lookNumber, meetingWhen: formatMeetingTime(new Date(meeting.scheduled_at), meeting.time_zone), decision: rec.decision as RecommendationDecision, recordedOn: day(rec.recordedAt), chairName: chair.name });
  const contentHash = letterContentHash(content);
  const latest = (await fetchLetters(meeting.id))[0];
  if (latest && latest.contentHash === contentHash && latest.recommendationId === rec.id) return { id: latest.id, version: latest.version, created: false };
  await confirmSigner(access.user, input.password);
  return writeTransaction(async (tx) => {
    await lockMeetingRow(tx, meeting.id);
    const last = await tx("recommendation_letters").where({ meeting_id: meeting.id }).max({ v: "version" }).first();
    const version = Number(last?.v ?? 0) + 1;
    const rendered = await renderLetterPdf(content, { version, contentHash, signedAt: now });
    const signature = await insertSignature(tx, {
      userId: access.user.id,
      signerName: access.user.name,
      signerEmail: access.user.email,
      meaning: "recommendation letter signed",
      entityType: "meeting",
      entityId: meeting.id,
      record: { meetingId: meeting.id, recommendationId: rec.id, version, contentHash },
    });
    const stored = await insertLetterVersion(tx, { trialId: access.trial.id, meetingId: meeting.id, recommendationId: rec.id, contentHash, pdf: rendered.pdf, pageCount: rendered.pageCount, signatureId: signature.id, createdBy: access.user.id, now });
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "recommendation_letter_signed", entityType: "recommendation_letter", entityId: stored.id, visibility: "open", newValues: { meetingId: meeting.id, version: stored.version, contentHash, decision: rec.decision, signatureId: signature.id } });
    return { id: stored.id, version: stored.version, created: true };
  });
}

function letterContent(trial: TrialRow, f: { lookNumber: number; meetingWhen: string; decision: RecommendationDecision; recordedOn: string; chairName: string }): LetterContent {
  return {
    trialCode: trial.code,
    trialTitle: trial.title,
    sponsorName: trial.sponsor_name,
    lookNumber: f.lookNumber,
    meetingWhen: f.meetingWhen,
    decision: f.decision,
    decisionLabel: DECISION_LABELS[f.decision],
    recordedOn: f.recordedOn,
    chairName: f.chairName,
    caution: CAUTION_TEXT,
  };
}

function letterAttachmentName(trialCode: string, version: number): string {
  return `${trialCode}-dmc-recommendation-letter-v${version}.pdf`;
}

/** Records the letter e-mails (latest version attached) to the sponsor's contacts on the trial; delivery is the outbox's. */
export async function queueLetterMail(access: TrialAccess, raw: unknown, now = new Date()): Promise<{ ids: number[]; version: number; recipients: number }> {
  assertCapability(access, "recordRecommendation");
  const input = letterSendSchema.parse(raw);
  const meeting = await meetingOf(access, input.meetingId);
  requireChair(access, await fetchCommittee(access.trial.id));
  const letter = (await fetchLetters(meeting.id))[0];
  if (!letter) throw conflict("Sign the letter before sending it.");
  const sponsors = (await fetchTrialRecipients(access.trial.id)).filter((m) => m.role === "sponsor");
  if (sponsors.length === 0) throw conflict("Nobody on this trial holds the sponsor role, so there is nobody to send the letter to.");
  const attachmentName = letterAttachmentName(access.trial.code, letter.version);
  const emails: NewEmail[] = sponsors.map((s) => ({
    trialId: access.trial.id,
    meetingId: meeting.id,
    packetId: null,
    toUserId: s.userId,
    toAddress: s.email,
    subject: oneLine(`${access.trial.code}: recommendation of the data monitoring committee (look ${meeting.lookNumber})`),
    kind: "recommendation_letter",
    bodyText:
      `Dear ${s.name},\n\nThe data monitoring committee of ${access.trial.code} (${access.trial.title}) has recorded its recommendation for interim look ${meeting.lookNumber}. ` +
      `The letter, signed by the committee's chair, is attached as ${attachmentName} (PDF, version ${letter.version}, content SHA-256 ${letter.contentHash}).` +
      `\n\n--\nCaution. ${CAUTION_TEXT}\n\nYou receive this as the trial's sponsor contact. This message was sent by Cairn, the trial's interim-monitoring system; replies are not read.`,
    createdBy: access.user.id,
  }));
  const ids = await writeTransaction(async (tx) => {
    const ids = await insertEmails(tx, emails, now);
    for (const id of ids) await tx("email_messages").where({ id }).update({ letter_id: letter.id });
    await appendAudit(tx, { actorUserId: access.user.id, actorEmail: access.user.email, trialId: access.trial.id, action: "recommendation_letter_queued", entityType: "recommendation_letter", entityId: letter.id, visibility: "open", newValues: { version: letter.version, messages: emails.map((e, i) => ({ id: ids[i], to: e.toAddress })) } });
    return ids;
  });
  return { ids, version: letter.version, recipients: emails.length };
}
