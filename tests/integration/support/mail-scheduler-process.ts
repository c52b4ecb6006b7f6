/**
 * One web process's mail scheduler, alone in a process, for tests/integration/mail-scheduler.test.ts.
 * Waits until the wall-clock time given as argv[2] (ms since the epoch) so that two copies started a
 * moment apart begin their rounds together, runs the scheduler every argv[3] ms for argv[4] ms, then
 * stops and prints one JSON line: its holder id and the rounds in which it held the lease.
 * Run with: tsx --conditions=react-server (server-only resolves to nothing under that condition).
 */
import { db } from "@/db/knex";
import { startMailScheduler, type SchedulerTick } from "@/lib/mail/scheduler";

const [startAt, everyMs, forMs] = process.argv.slice(2).map(Number);
await new Promise((r) => setTimeout(r, Math.max(0, startAt - Date.now())));
const led: SchedulerTick[] = [];
const s = startMailScheduler(everyMs, { leaseMs: 30_000, policy: { maxAttempts: 3, delaysMs: [200, 400], leaseMs: 30_000 } });
const until = Date.now() + forMs;
while (Date.now() < until) {
  const t = await s.tickNow();
  if (t?.leader) led.push(t);
  await new Promise((r) => setTimeout(r, everyMs));
}
await s.stop();
console.log(JSON.stringify({ holder: s.holder, led }));
await db.destroy();
