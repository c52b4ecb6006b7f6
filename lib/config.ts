import "server-only";
/**
 * Configuration is read here and nowhere else: typed getters over process.env.
 * scripts/up and scripts/test export these; see .env.example for the list.
 */
import { databaseConnection } from "./config-shared";

export { databaseConnection };

function required(name: string): string {
  const v = process.env[name];
  if (!v) throw new Error(`Missing configuration: ${name} (start Cairn with scripts/up)`);
  return v;
}

export const config = {
  authSecret: () => required("NEXTAUTH_SECRET"),
  appUrl: () => process.env.NEXTAUTH_URL ?? "http://localhost:3000",
  isProduction: () => process.env.NODE_ENV === "production" && process.env.CAIRN_INSECURE_COOKIES !== "1",
  smtp: () => ({
    host: process.env.SMTP_HOST ?? "127.0.0.1",
    port: Number(process.env.SMTP_PORT ?? 2525),
    user: process.env.SMTP_USER || undefined,
    pass: process.env.SMTP_PASS || undefined,
    from: process.env.MAIL_FROM ?? "Cairn <cairn@localhost>",
  }),
  mailCatcherDir: () => process.env.CAIRN_MAIL_DIR ?? ".data/mail",
  /**
   * How often (ms) each web process offers to run the mail scheduler (due reminders, mail retries);
   * one process at a time runs it (lib/mail/scheduler.ts). 0 turns it off (scripts/send-reminders.ts
   * and the meetings page's button still work).
   */
  mailSchedulerMs: () => {
    const v = Number(process.env.CAIRN_MAIL_SCHEDULER_MS ?? 60_000);
    return Number.isFinite(v) && v >= 0 ? Math.floor(v) : 60_000;
  },
  /** Off by default: X-Forwarded-For is ignored unless Cairn runs behind one reverse proxy that sets it. */
  trustedProxy: () => ["1", "true", "yes", "on"].includes((process.env.CAIRN_TRUSTED_PROXY ?? "").toLowerCase()),
};
