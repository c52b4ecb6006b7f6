/**
 * The mail scheduler (lib/mail/scheduler.ts): due reminders and mail retries run on their own, and
 * of several web processes sharing the database exactly one sends. Two real processes
 * (tests/integration/support/mail-scheduler-process.ts) run the scheduler at the same time against a
 * reminder that fell due in the past; the project's mail catcher must receive it once per invitee.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtemp, readdir, readFile, rm } from "node:fs/promises";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { simpleParser, type ParsedMail } from "mailparser";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db, resetDatabase } from "./support/db";
import { freePort } from "./support/free-port";
import { seedDemo } from "@/db/seeds/demo";
import { insertMeeting } from "@/db/queries/meetings";
import { insertEmails } from "@/db/queries/emails";
import { fetchTrialByCode } from "@/db/queries/trials";
import { fetchUserByEmail } from "@/db/queries/users";
import { claimLease, fetchLease } from "@/db/queries/scheduler-leases";
import { MAIL_LEASE, runSchedulerTick } from "@/lib/mail/scheduler";
import type { TrialRow } from "@/db/types";

const PORT = await freePort();
process.env.SMTP_HOST = "127.0.0.1";
process.env.SMTP_PORT = String(PORT);
process.env.NEXTAUTH_URL = "http://localhost:3999";

let dir: string;
let catcher: ChildProcess | null = null;
let trial: TrialRow;
let meetingId: number;
const INVITEES = ["dmc@cairn.example", "coordinator@cairn.example"];

function portOpen(): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect(PORT, "127.0.0.1");
    s.once("connect", () => (s.destroy(), resolve(true)));
    s.once("error", () => resolve(false));
  });
}

async function caught(): Promise<ParsedMail[]> {
  const files = (await readdir(dir)).filter((f) => f.endsWith(".eml")).sort();
  return Promise.all(files.map(async (f) => simpleParser(await readFile(path.join(dir, f)))));
}
const toAddress = (m: ParsedMail) => (Array.isArray(m.to) ? m.to[0] : m.to)?.value[0]?.address ?? "";

type SchedulerRun = { holder: string; led: { remindersQueued: number; outcomes: Record<string, string> }[] };

/**
 * Starts one scheduler process; `ready` resolves once it has loaded and connected, `go()` lets it
 * begin its rounds, and `done` resolves with what it printed at the end.
 */
function schedulerProcess(everyMs: number, forMs: number): { ready: Promise<void>; go: () => void; done: Promise<SchedulerRun> } {
  const child = spawn(path.resolve("node_modules/.bin/tsx"), ["--conditions=react-server", "tests/integration/support/mail-scheduler-process.ts", String(everyMs), String(forMs)], {
    env: process.env,
    stdio: ["pipe", "pipe", "pipe"],
  });
  let out = "";
  let err = "";
  let markReady: () => void = () => undefined;
  const ready = new Promise<void>((resolve) => (markReady = resolve));
  child.stdout.on("data", (d: Buffer) => {
    out += d.toString();
    if (/^ready$/m.test(out)) markReady();
  });
  child.stderr.on("data", (d: Buffer) => (err += d.toString()));
  const done = new Promise<SchedulerRun>((resolve, reject) => {
    child.once("exit", (code) => {
      if (code !== 0) return reject(new Error(`scheduler process exited with ${code}:\n${err}`));
      try {
        resolve(JSON.parse(out.trim().split("\n").at(-1)!));
      } catch {
        reject(new Error(`unexpected output:\n${out}\n${err}`));
      }
    });
  });
  return { ready: Promise.race([ready, done.then(() => undefined)]), go: () => child.stdin.end("go\n"), done };
}

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), "cairn-scheduler-mail-"));
  await resetDatabase();
  await seedDemo();
  trial = (await fetchTrialByCode("CRN-201"))!;
  const coordinator = (await fetchUserByEmail("coordinator@cairn.example"))!;
  const look2 = await db("analyses").where({ trial_id: trial.id, look_number: 2 }).first();
  const invitees = await db("users").whereIn("email", INVITEES).pluck("id");
  // In two days, reminder three days ahead: the reminder fell due a day ago and was never sent.
  meetingId = await db.transaction((tx) =>
    insertMeeting(tx, { trialId: trial.id, analysisId: look2.id, scheduledAt: new Date(Date.now() + 2 * 86_400_000), timeZone: "UTC", openAgenda: "Scheduler agenda", closedAgenda: "", reminderDaysBefore: 3, createdBy: coordinator.id, attendeeUserIds: invitees }),
  );
  catcher = spawn(path.resolve("node_modules/.bin/tsx"), ["scripts/mail-catcher.ts", "--port", String(PORT), "--dir", dir], { stdio: "ignore", detached: true });
  for (let i = 0; i < 150 && !(await portOpen()); i++) await new Promise((r) => setTimeout(r, 100));
  if (!(await portOpen())) throw new Error("the mail catcher did not start");
}, 120_000);

afterAll(async () => {
  if (catcher?.pid && catcher.exitCode === null) process.kill(-catcher.pid, "SIGTERM");
  await rm(dir, { recursive: true, force: true });
});

describe("the mail scheduler", () => {
  it("sends a reminder due in the past exactly once when two processes run the scheduler at the same time", async () => {
    // Both processes load (a few seconds each on a loaded machine), then begin together on one signal.
    const procs = [schedulerProcess(150, 3_000), schedulerProcess(150, 3_000)];
    await Promise.all(procs.map((p) => p.ready));
    for (const p of procs) p.go();
    const [a, b] = await Promise.all(procs.map((p) => p.done));
    expect(a.holder).not.toBe(b.holder);
    const queued = [...a.led, ...b.led].reduce((n, t) => n + t.remindersQueued, 0);
    expect(queued).toBe(INVITEES.length);
    // One process queued and sent it; whichever it was, the other queued nothing.
    expect([a, b].filter((p) => p.led.some((t) => t.remindersQueued > 0))).toHaveLength(1);
    const rows = await db("email_messages").where({ meeting_id: meetingId, kind: "meeting_reminder" });
    expect(rows.map((r: { to_address: string }) => r.to_address).sort()).toEqual([...INVITEES].sort());
    expect(rows.every((r: { status: string; attempts: number }) => r.status === "sent" && r.attempts === 1)).toBe(true);
    const reminders = (await caught()).filter((m) => m.subject?.startsWith("[CRN-201] Reminder"));
    expect(reminders.map(toAddress).sort()).toEqual([...INVITEES].sort());
    // The text states the real lead time (about two days), not the planned three.
    expect(reminders[0].text).toMatch(/which starts in (1 day and 23 hours|2 days)/);
    expect(await db("audit_events").where({ action: "meeting_reminder_queued", entity_id: String(meetingId) }).count({ n: "*" }).first()).toMatchObject({ n: 1 });
  }, 120_000);

  it("lets exactly one of many simultaneous claimants hold the lease, and another take over only after it expires", async () => {
    const name = "test-lease";
    const now = new Date();
    const until = new Date(now.getTime() + 60_000);
    const won = await Promise.all(Array.from({ length: 8 }, (_, i) => claimLease(name, `holder-${i}`, now, until)));
    expect(won.filter(Boolean)).toHaveLength(1);
    const holder = `holder-${won.indexOf(true)}`;
    const other = holder === "holder-0" ? "holder-1" : "holder-0";
    expect(await claimLease(name, other, new Date(now.getTime() + 59_000), new Date(now.getTime() + 120_000))).toBe(false);
    expect(await claimLease(name, holder, new Date(now.getTime() + 30_000), new Date(now.getTime() + 90_000))).toBe(true);
    expect(await claimLease(name, other, new Date(now.getTime() + 89_999), new Date(now.getTime() + 150_000))).toBe(false);
    expect(await claimLease(name, other, new Date(now.getTime() + 90_000), new Date(now.getTime() + 150_000))).toBe(true);
    expect((await fetchLease(name))!.holder).toBe(other);
  });

  it("retries a message whose earlier attempt failed, without anyone pressing a button", async () => {
    const past = new Date(Date.now() - 60_000);
    const [id] = await db.transaction((tx) =>
      insertEmails(tx, [{ trialId: trial.id, meetingId, packetId: null, toUserId: null, toAddress: "retry@test.example", subject: "[CRN-201] Retry check", kind: "meeting_reminder", bodyText: "Retry body", createdBy: null }], past),
    );
    // As a failed first attempt leaves it: attempts 1, due again in the past.
    await db("email_messages").where({ id }).update({ attempts: 1, last_error: "ECONNREFUSED: earlier", next_attempt_at: past });
    // The two processes above released the lease when they stopped; a new holder takes it.
    const tick = await runSchedulerTick({ holder: "test-process", leaseMs: 30_000, policy: { maxAttempts: 3, delaysMs: [200, 400], leaseMs: 30_000 } });
    expect(tick.leader).toBe(true);
    expect(tick.outcomes[id]).toBe("sent");
    expect(await db("email_messages").where({ id }).first()).toMatchObject({ status: "sent", attempts: 2 });
    expect((await caught()).filter((m) => m.subject === "[CRN-201] Retry check")).toHaveLength(1);
    // Another process's round meanwhile does nothing: the lease is held.
    expect((await runSchedulerTick({ holder: "second-process", leaseMs: 30_000 })).leader).toBe(false);
    expect((await fetchLease(MAIL_LEASE))!.holder).toBe("test-process");
  });
});
