import "server-only";
/**
 * Delivery of recorded e-mails with retries. A message is tried at once, then after 5 s, then
 * after 30 s; after the third failure it is marked failed (and shown so). Each attempt first
 * claims the row (status "sending" with a lease), so two processes never send the same message
 * twice, and a sender that dies mid-attempt leaves a row that becomes due again when its lease ends.
 * Nothing here blocks a page: callers start delivery after responding (next/server `after`).
 */
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { claimEmail, fetchDueEmailIds, fetchEmail, markEmailAttemptFailed, markEmailSent } from "@/db/queries/emails";
import { fetchPacketPdf } from "@/db/queries/packets";
import { fetchLetterById } from "@/db/queries/committee";
import { fetchTrial } from "@/db/queries/trials";
import { after } from "next/server";
import { mailFrom, mailTransport } from "./transport";

export type RetryPolicy = { maxAttempts: number; delaysMs: number[]; leaseMs: number };
/** Three tries: now, +5 s, +30 s (common practice for a short outage, no source). */
export const DEFAULT_RETRY: RetryPolicy = { maxAttempts: 3, delaysMs: [5_000, 30_000], leaseMs: 120_000 };

export type AttemptOutcome = "sent" | "retry" | "failed" | "skipped";

async function record(id: number, trialId: number | null, action: string, values: Record<string, unknown>, write: (tx: import("knex").Knex.Transaction) => Promise<void>) {
  await writeTransaction(async (tx) => {
    await write(tx);
    await appendAudit(tx, { actorUserId: null, actorEmail: "cairn-mail", trialId, action, entityType: "email_message", entityId: id, visibility: "open", newValues: values });
  });
}

/** One attempt at one message, if it is due. Returns what happened; schedules nothing by itself. */
export async function attemptDelivery(id: number, policy: RetryPolicy = DEFAULT_RETRY, now = new Date()): Promise<AttemptOutcome> {
  const attempt = await writeTransaction((tx) => claimEmail(tx, id, now, new Date(now.getTime() + policy.leaseMs)));
  if (attempt === null) return "skipped";
  const msg = await fetchEmail(id);
  if (!msg) return "skipped";
  try {
    const attachments = [];
    if (msg.kind === "packet_open") {
      const packet = msg.packet_id ? await fetchPacketPdf(msg.packet_id) : undefined;
      // By construction only an open packet can travel as an attachment.
      if (!packet || packet.audience !== "open") throw new Error("the open packet to attach is missing");
      const trial = msg.trial_id === null ? undefined : await fetchTrial(msg.trial_id);
      attachments.push({ filename: `${trial?.code ?? "trial"}-open-report-v${packet.version}.pdf`, content: Buffer.from(packet.pdf), contentType: "application/pdf" });
    }
    if (msg.kind === "recommendation_letter") {
      // The committee's letter to the sponsor: open by construction (lib/committee/letter.ts).
      const letter = msg.letter_id ? await fetchLetterById(msg.letter_id) : undefined;
      if (!letter) throw new Error("the recommendation letter to attach is missing");
      const trial = msg.trial_id === null ? undefined : await fetchTrial(msg.trial_id);
      attachments.push({ filename: `${trial?.code ?? "trial"}-dmc-recommendation-letter-v${letter.version}.pdf`, content: Buffer.from(letter.pdf), contentType: "application/pdf" });
    }
    const info = await mailTransport().sendMail({
      from: mailFrom(),
      to: msg.to_address,
      subject: msg.subject,
      text: msg.body_text,
      attachments,
      headers: { "X-Cairn-Message": String(msg.id), "X-Cairn-Kind": msg.kind },
    });
    const sentAt = new Date();
    await record(id, msg.trial_id, "email_sent", { to: msg.to_address, subject: msg.subject, attempt }, (tx) => markEmailSent(tx, id, sentAt, info.messageId ?? null));
    return "sent";
  } catch (e) {
    const error = e instanceof Error ? `${(e as { code?: string }).code ?? e.name}: ${e.message}` : String(e);
    const last = attempt >= policy.maxAttempts;
    const retryAt = last ? null : new Date(Date.now() + (policy.delaysMs[attempt - 1] ?? policy.delaysMs.at(-1) ?? 30_000));
    await record(id, msg.trial_id, last ? "email_failed" : "email_attempt_failed", { to: msg.to_address, attempt, error, retryAt }, (tx) => markEmailAttemptFailed(tx, id, error, retryAt));
    return last ? "failed" : "retry";
  }
}

/**
 * Tries each message now and keeps retrying it in this process on the back-off schedule until it
 * is sent or failed. Resolves when every message has reached a final state (tests await it; pages
 * do not).
 */
export async function deliverWithRetries(ids: number[], policy: RetryPolicy = DEFAULT_RETRY): Promise<Record<number, AttemptOutcome>> {
  const results: Record<number, AttemptOutcome> = {};
  await Promise.all(
    ids.map(async (id) => {
      for (;;) {
        const outcome = await attemptDelivery(id, policy);
        if (outcome !== "retry") {
          results[id] = outcome;
          return;
        }
        const row = await fetchEmail(id);
        const wait = row?.next_attempt_at ? Math.max(0, new Date(row.next_attempt_at).getTime() - Date.now()) : 0;
        await new Promise((r) => setTimeout(r, wait + 5));
      }
    }),
  );
  return results;
}

/** Sends every message whose next try is due (called on an interval, on page load, and by scripts). */
export async function retryDueMessages(policy: RetryPolicy = DEFAULT_RETRY, now = new Date()): Promise<Record<number, AttemptOutcome>> {
  const ids = await fetchDueEmailIds(now);
  const out: Record<number, AttemptOutcome> = {};
  for (const id of ids) out[id] = await attemptDelivery(id, policy, now);
  return out;
}

/**
 * Makes sure this process takes part in the mail scheduler (lib/mail/scheduler.ts), which picks up
 * due messages and reminders with one sender across processes. instrumentation.ts starts it when the
 * process starts; callers that have just recorded mail call this too, which does nothing if it runs.
 */
export function ensureMailWorker(): void {
  void import("./scheduler").then(
    (m) => m.ensureMailScheduler(),
    (e) => console.error("[cairn] the mail scheduler could not start", e),
  );
}

/**
 * For server actions that have just recorded mail: delivers it after the response is sent (Next's
 * `after`), so a slow or dead mail server never holds up the page. Outside a request (a test, a
 * script) there is no "after": the mail scheduler's sweep sends the messages.
 */
export function deliverAfterResponse(ids: number[]): void {
  ensureMailWorker();
  try {
    after(async () => {
      try {
        await deliverWithRetries(ids);
      } catch (e) {
        console.error("[cairn] background mail delivery stopped; the retry sweep will pick the messages up", e);
      }
    });
  } catch {
    // No request to run after: the sweep picks the messages up.
  }
}
