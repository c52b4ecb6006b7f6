/**
 * Sends the reminders that are due (each scheduled meeting's reminder goes out once, from
 * reminder_days_before days ahead), then any other message whose retry is due, and waits for
 * delivery. Meant for a daily scheduler (cron) next to the running app.
 * Run with: tsx --conditions=react-server scripts/send-reminders.ts
 */
import { db } from "../db/knex";
import { queueDueReminders } from "../lib/mail/outbox";
import { deliverWithRetries, retryDueMessages } from "../lib/mail/delivery";

try {
  const ids = await queueDueReminders();
  const outcomes = await deliverWithRetries(ids);
  const swept = await retryDueMessages();
  const sent = Object.values(outcomes).filter((o) => o === "sent").length;
  const failed = Object.values(outcomes).filter((o) => o === "failed").length;
  console.log(`reminders: ${ids.length} recorded, ${sent} sent, ${failed} failed; other due messages retried: ${Object.keys(swept).length}`);
  if (failed) process.exitCode = 1;
} finally {
  await db.destroy();
}
