/**
 * E-mail end to end: the project's mail catcher (scripts/mail-catcher.ts, smtp-server) runs as a
 * child process on loopback; Cairn sends a meeting packet through nodemailer; the received
 * messages are parsed with mailparser. Then the catcher is stopped to check retries and failures.
 */
import { spawn, execFileSync, type ChildProcess } from "node:child_process";
import { mkdtemp, readdir, readFile, rm } from "node:fs/promises";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { simpleParser, type ParsedMail } from "mailparser";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db, resetDatabase } from "./support/db";
import { seedDemo } from "@/db/seeds/demo";
import { insertMeeting } from "@/db/queries/meetings";
import { fetchEmail, requeueFailedEmail } from "@/db/queries/emails";
import { fetchTrialByCode } from "@/db/queries/trials";
import { fetchUserByEmail, toPublicUser } from "@/db/queries/users";
import { generateOpenPacket } from "@/lib/packets/open-packet";
import { prepareClosedPacket } from "@/lib/packets/closed-packet";
import { asClosedConnection } from "@/db/knex";
import { queueDueReminders, queuePacketMail } from "@/lib/mail/outbox";
import { attemptDelivery, deliverWithRetries, retryDueMessages, type RetryPolicy } from "@/lib/mail/delivery";
import { CAUTION_TEXT } from "@/components/caution";
import type { PublicUser, TrialRow } from "@/db/types";
import { freePort } from "./support/free-port";

// A free port, not a fixed one: another test run on the machine may hold any fixed number.
const PORT = await freePort();
process.env.SMTP_HOST = "127.0.0.1";
process.env.SMTP_PORT = String(PORT);
process.env.NEXTAUTH_URL = "http://localhost:3999";
process.env.MAIL_FROM = "Cairn test <cairn@test.example>";

const FAST: RetryPolicy = { maxAttempts: 3, delaysMs: [200, 400], leaseMs: 60_000 };
const BLINDED = ["sponsor@cairn.example", "coordinator@cairn.example"];
const UNBLINDED = ["dmc@cairn.example", "dmc2@cairn.example", "statistician@cairn.example"];

let dir: string;
let catcher: ChildProcess | null = null;
let trial: TrialRow;
let coordinator: PublicUser;
let meetingId: number;

function portOpen(): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect(PORT, "127.0.0.1");
    s.once("connect", () => (s.destroy(), resolve(true)));
    s.once("error", () => resolve(false));
  });
}

async function startCatcher(): Promise<void> {
  // Its own process group, so stopping it stops tsx's node child too (npx and tsx do not forward signals reliably).
  catcher = spawn(path.resolve("node_modules/.bin/tsx"), ["scripts/mail-catcher.ts", "--port", String(PORT), "--dir", dir], { stdio: "ignore", detached: true });
  for (let i = 0; i < 150; i++) {
    if (await portOpen()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("the mail catcher did not start");
}

async function stopCatcher(): Promise<void> {
  if (!catcher) return;
  const c = catcher;
  catcher = null;
  const exited = new Promise((r) => c.once("exit", r));
  if (c.exitCode === null && c.pid) process.kill(-c.pid, "SIGTERM");
  await exited;
  for (let i = 0; i < 50 && (await portOpen()); i++) await new Promise((r) => setTimeout(r, 100));
}

/** Every message the catcher stored, parsed from its .eml with mailparser. */
async function caught(): Promise<ParsedMail[]> {
  const files = (await readdir(dir)).filter((f) => f.endsWith(".eml")).sort();
  return Promise.all(files.map(async (f) => simpleParser(await readFile(path.join(dir, f)))));
}

const toAddress = (m: ParsedMail) => (Array.isArray(m.to) ? m.to[0] : m.to)?.value[0]?.address ?? "";

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), "cairn-mail-"));
  await resetDatabase();
  await seedDemo();
  trial = (await fetchTrialByCode("CRN-201"))!;
  coordinator = toPublicUser((await fetchUserByEmail("coordinator@cairn.example"))!);
  const look2 = await db("analyses").where({ trial_id: trial.id, look_number: 2 }).first();
  const invitees = await db("users").whereIn("email", ["dmc@cairn.example", "coordinator@cairn.example"]).pluck("id");
  meetingId = await db.transaction((tx) =>
    insertMeeting(tx, { trialId: trial.id, analysisId: look2.id, scheduledAt: new Date("2026-10-20T13:00:00Z"), timeZone: "Europe/Oslo", openAgenda: "1. Accrual", closedAgenda: "2. Closed review", reminderDaysBefore: 3, createdBy: coordinator.id, attendeeUserIds: invitees }),
  );
  await generateOpenPacket(trial, meetingId, coordinator);
  // The closed packet is prepared by the unblinded statistician (from the closed review in the app).
  const statistician = toPublicUser((await fetchUserByEmail("statistician@cairn.example"))!);
  await prepareClosedPacket(trial, meetingId, statistician, asClosedConnection(db));
  await startCatcher();
}, 120_000);

afterAll(async () => {
  await stopCatcher();
  await rm(dir, { recursive: true, force: true });
});

describe("sending a meeting packet", () => {
  let messages: ParsedMail[] = [];

  it("records one message per recipient and delivers all of them", async () => {
    const q = await queuePacketMail(trial, meetingId, coordinator);
    expect(q.ids).toHaveLength(5);
    const outcomes = await deliverWithRetries(q.ids, FAST);
    expect(Object.values(outcomes)).toEqual(["sent", "sent", "sent", "sent", "sent"]);
    const rows = await db("email_messages").whereIn("id", q.ids);
    expect(rows.every((r: { status: string; attempts: number; sent_at: Date | null }) => r.status === "sent" && r.attempts === 1 && r.sent_at)).toBe(true);
    messages = await caught();
    expect(messages.map(toAddress).sort()).toEqual([...BLINDED, ...UNBLINDED].sort());
  });

  it("sponsor and coordinator get the open report as a PDF attachment, with the caution", () => {
    for (const who of BLINDED) {
      const m = messages.find((x) => toAddress(x) === who)!;
      expect(m.subject).toBe("[CRN-201] DMC meeting packet, open report v1 (look 2)");
      expect(m.attachments).toHaveLength(1);
      expect(m.attachments[0].contentType).toBe("application/pdf");
      expect(m.attachments[0].filename).toBe("CRN-201-open-report-v1.pdf");
      expect(m.text).toContain(CAUTION_TEXT);
      expect(m.from?.text).toContain("cairn@test.example");
    }
  });

  it("no closed data reaches a blinded recipient: the attachment is the open report only", () => {
    for (const who of BLINDED) {
      const m = messages.find((x) => toAddress(x) === who)!;
      const text = execFileSync("/usr/bin/pdftotext", ["-", "-"], { input: m.attachments[0].content }).toString("utf8");
      expect(text).toContain("OPEN REPORT");
      for (const closed of ["CLOSED REPORT", "Posterior", "Interim counts", "Stopping boundaries", "Responders", "Prior sensitivity"]) expect(text).not.toContain(closed);
      expect(m.text ?? "").not.toMatch(/closed report v\d|posterior|responders/i);
    }
  });

  it("DMC members and the unblinded statistician get a link to the closed report, never an attachment", () => {
    for (const who of UNBLINDED) {
      const m = messages.find((x) => toAddress(x) === who)!;
      expect(m.subject).toBe("[CRN-201] DMC meeting packet: closed report v1 ready in Cairn (look 2)");
      expect(m.attachments).toHaveLength(0);
      expect(m.text).toContain(`http://localhost:3999/trials/${trial.id}/meetings/${meetingId}#packets`);
      expect(m.text).toContain(CAUTION_TEXT);
      expect(m.text ?? "").not.toMatch(/responders|posterior mean|predictive probability of success is/i);
    }
  });
});

describe("when the mail server is down", () => {
  it("records the failed attempt with its error and a retry time, then delivers once the server is back (no message lost)", async () => {
    await stopCatcher();
    const before = (await caught()).length;
    const q = await queuePacketMail(trial, meetingId, coordinator);
    const first = await Promise.all(q.ids.map((id) => attemptDelivery(id, FAST)));
    expect(first.every((o) => o === "retry")).toBe(true);
    let due = 0;
    for (const id of q.ids) {
      const row = (await fetchEmail(id))!;
      expect(row.status).toBe("queued");
      expect(row.attempts).toBe(1);
      expect(row.last_error).toMatch(/ECONNREFUSED/);
      expect(row.next_attempt_at).not.toBeNull();
      due = Math.max(due, new Date(row.next_attempt_at!).getTime());
    }
    await startCatcher();
    // The sweep runs at the moment the last retry falls due (its clock is a parameter), not after a sleep.
    const swept = await retryDueMessages(FAST, new Date(due));
    expect(q.ids.map((id) => swept[id])).toEqual(q.ids.map(() => "sent"));
    for (const id of q.ids) expect((await fetchEmail(id))!).toMatchObject({ status: "sent", attempts: 2 });
    expect((await caught()).length).toBe(before + q.ids.length);
  });

  it("after the last of three tries the message is marked failed, with the error kept", async () => {
    await stopCatcher();
    const q = await queuePacketMail(trial, meetingId, coordinator);
    const id = q.ids[0];
    const outcomes = await deliverWithRetries([id], FAST);
    expect(outcomes[id]).toBe("failed");
    const row = (await fetchEmail(id))!;
    expect(row).toMatchObject({ status: "failed", attempts: 3, next_attempt_at: null });
    expect(row.last_error).toMatch(/ECONNREFUSED/);
    const audit = await db("audit_events").where({ entity_type: "email_message", entity_id: String(id) }).pluck("action");
    expect(audit).toEqual(["email_attempt_failed", "email_attempt_failed", "email_failed"]);
    // A failed message is not picked up again by the sweep.
    await startCatcher();
    const swept = await retryDueMessages(FAST, new Date(Date.now() + 3_600_000));
    expect(swept[id]).toBeUndefined();
    // Once someone asks for it ("Send again"), it gets a fresh round of tries and goes out.
    expect(await db.transaction((tx) => requeueFailedEmail(tx, id, new Date()))).toBe(true);
    expect(await deliverWithRetries([id], FAST)).toEqual({ [id]: "sent" });
    expect((await fetchEmail(id))!).toMatchObject({ status: "sent", attempts: 1 });
  });
});

describe("reminders", () => {
  it("go to the invitees once the reminder window opens, and only once", async () => {
    const scheduled = new Date(Date.now() + 2 * 86_400_000);
    const look2 = await db("analyses").where({ trial_id: trial.id, look_number: 2 }).first();
    const dmc = (await fetchUserByEmail("dmc@cairn.example"))!;
    const m = await db.transaction((tx) =>
      insertMeeting(tx, { trialId: trial.id, analysisId: look2.id, scheduledAt: scheduled, timeZone: "UTC", openAgenda: "Reminder agenda", closedAgenda: "", reminderDaysBefore: 3, createdBy: coordinator.id, attendeeUserIds: [dmc.id] }),
    );
    const early = await queueDueReminders({ now: new Date(scheduled.getTime() - 4 * 86_400_000), trialId: trial.id });
    expect(early).toEqual([]);
    const ids = await queueDueReminders({ trialId: trial.id });
    expect(ids).toHaveLength(1);
    expect(await queueDueReminders({ trialId: trial.id })).toEqual([]);
    expect(await deliverWithRetries(ids, FAST)).toEqual({ [ids[0]]: "sent" });
    const mail = (await caught()).find((x) => x.subject?.startsWith("[CRN-201] Reminder"))!;
    expect(toAddress(mail)).toBe("dmc@cairn.example");
    expect(mail.text).toContain("Reminder agenda");
    expect(mail.text).toContain(CAUTION_TEXT);
    expect(mail.text).toContain(`/trials/${trial.id}/meetings/${m}#packets`);
  });
});
