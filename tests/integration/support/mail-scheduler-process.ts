/**
 * One web process's mail scheduler, alone in a process, for tests/integration/mail-scheduler.test.ts.
 * Prints "ready" once loaded and waits for a line "go" on stdin, so that two copies that took different
 * times to start begin their rounds together when the test says so (an event, not a clock); then runs
 * the scheduler every argv[2] ms for argv[3] ms, stops and prints one JSON line: its holder id and the
 * rounds in which it held the lease.
 * Run with: tsx --conditions=react-server (server-only resolves to nothing under that condition).
 */
import { db } from "@/db/knex";
import { startMailScheduler, type SchedulerTick } from "@/lib/mail/scheduler";
import { createInterface } from "node:readline";

const [everyMs, forMs] = process.argv.slice(2).map(Number);
// Connected before "ready", so the first round does not also wait for a connection.
await db.raw("SELECT 1");
const lines = createInterface({ input: process.stdin });
console.log("ready");
let go = false;
for await (const line of lines) if ((go = line === "go")) break;
// The test went away without the signal: end rather than linger.
if (!go) process.exit(1);
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
// The mail transport keeps its pooled SMTP connection open for reuse, as a web process wants; a
// one-shot process ends here instead of waiting for it to time out.
process.exit(0);
