import "server-only";
/**
 * The mail scheduler: every web process offers to run it on an interval (CAIRN_MAIL_SCHEDULER_MS),
 * and the lease row "mail" in scheduler_leases lets one process at a time do the work. A tick by
 * the lease holder records the reminders that are due (each meeting is claimed, so a reminder goes
 * out once) and then tries every message whose next attempt is due (new reminders, retries of
 * failed attempts, messages left by a process that died). The lease lasts a few intervals, so when
 * its holder stops, another process takes over after at most that long. The meetings page's
 * "Send due reminders" button stays as a manual nudge over the same functions.
 */
import { randomUUID } from "node:crypto";
import os from "node:os";
import { claimLease, releaseLease } from "@/db/queries/scheduler-leases";
import { config } from "@/lib/config";
import { queueDueReminders } from "./outbox";
import { DEFAULT_RETRY, retryDueMessages, type AttemptOutcome, type RetryPolicy } from "./delivery";

export const MAIL_LEASE = "mail";

export type SchedulerTick = { leader: boolean; remindersQueued: number; outcomes: Record<number, AttemptOutcome> };

type SchedulerOptions = { holder: string; leaseMs: number; policy?: RetryPolicy; now?: () => Date };

function newHolderId(): string {
  return `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`.slice(0, 128);
}

/** One round: take or renew the lease; if held, queue due reminders and send what is due. */
export async function runSchedulerTick(opts: SchedulerOptions): Promise<SchedulerTick> {
  const now = opts.now?.() ?? new Date();
  if (!(await claimLease(MAIL_LEASE, opts.holder, now, new Date(now.getTime() + opts.leaseMs)))) return { leader: false, remindersQueued: 0, outcomes: {} };
  const ids = await queueDueReminders({ now });
  const outcomes = await retryDueMessages(opts.policy ?? DEFAULT_RETRY, opts.now?.() ?? new Date());
  return { leader: true, remindersQueued: ids.length, outcomes };
}

type MailScheduler = { holder: string; stop: () => Promise<void>; tickNow: () => Promise<SchedulerTick | null> };

/**
 * Starts a scheduler in this process: one tick at once, then one per interval. Ticks never overlap
 * within a process (a slow SMTP round skips the next tick rather than stacking them).
 */
export function startMailScheduler(everyMs: number, opts: Partial<SchedulerOptions> = {}): MailScheduler {
  const holder = opts.holder ?? newHolderId();
  // A few intervals, and never shorter than an e-mail's own claim, so a slow round keeps its lease.
  const leaseMs = opts.leaseMs ?? Math.max(3 * everyMs, (opts.policy ?? DEFAULT_RETRY).leaseMs);
  let running: Promise<SchedulerTick | null> | null = null;
  let stopped = false;
  const tick = (): Promise<SchedulerTick | null> => {
    if (stopped) return Promise.resolve(null);
    if (running) return running;
    running = runSchedulerTick({ ...opts, holder, leaseMs })
      .catch((e) => {
        console.error("[cairn] mail scheduler round failed; the next round tries again", e);
        return null;
      })
      .finally(() => {
        running = null;
      });
    return running;
  };
  const timer = setInterval(() => void tick(), everyMs);
  timer.unref?.();
  void tick();
  return {
    holder,
    tickNow: tick,
    stop: async () => {
      stopped = true;
      clearInterval(timer);
      await running;
      await releaseLease(MAIL_LEASE, holder).catch(() => undefined);
    },
  };
}

const g = globalThis as unknown as { cairnMailScheduler?: MailScheduler };

/** Called once per server process (instrumentation.ts); does nothing when the interval is 0. */
export function ensureMailScheduler(): void {
  if (g.cairnMailScheduler) return;
  const every = config.mailSchedulerMs();
  if (every <= 0) return;
  g.cairnMailScheduler = startMailScheduler(every);
}
