/**
 * The committee decides as a committee, against the real database: one chair (a second refused,
 * a change audited), the charter's quorum counted in the closed session, signed declarations
 * (a conflicted member does not vote), the independent statistician does not vote, only the
 * chair records the committee's recommendation, approved minutes are immutable (a correction is a
 * new version), and the letter to the sponsor (pdftotext) carries the decision and the caution
 * and nothing closed; its e-mail is caught by the project's mail catcher with the PDF attached.
 */
import { spawn, execFileSync, type ChildProcess } from "node:child_process";
import { mkdtemp, readdir, readFile, rm } from "node:fs/promises";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { simpleParser, type ParsedMail } from "mailparser";
import { ZodError } from "zod";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { blindDb } from "@/db/knex";
import { checkTrialAccess, type TrialAccess } from "@/lib/auth";
import { HttpError } from "@/lib/http";
import { insertDesignVersion, markDesignLocked } from "@/db/queries/designs";
import { insertSignature } from "@/db/queries/signatures";
import { createPlannedLooks } from "@/db/queries/analyses";
import { replaceArmCounts } from "@/db/queries/closed";
import { insertMeeting } from "@/db/queries/meetings";
import { fetchCommittee, fetchOpenMinutes } from "@/db/queries/committee";
import { parseStoredDesign } from "@/db/queries/designs";
import { fetchMeetingRecommendationsClosed } from "@/db/queries/committee-closed";
import { fetchRecommendationsOpen } from "@/db/queries/open-status";
import { addCommitteeMember, approveMinutes, changeCommitteeChair, declareConflicts, recordSessionAttendance, saveMinutesDraft, setCharterQuorum } from "@/lib/committee/service";
import { amendDesign, designSignedRecord, lockDesign } from "@/lib/design/service";
import { recordHash } from "@/db/queries/signatures";
import { fetchCharterQuorum } from "@/db/queries/committee";
import { castVote } from "@/lib/committee/votes";
import { queueLetterMail, signRecommendationLetter } from "@/lib/committee/letter";
import { recordRecommendation } from "@/lib/review/record-recommendation";
import { deliverWithRetries, type RetryPolicy } from "@/lib/mail/delivery";
import { CAUTION_TEXT } from "@/lib/caution";
import type { PublicUser } from "@/db/types";
import { db, giveRole, makeTrial, makeUser, ownerKnex, resetDatabase } from "./support/db";
import { smallSingleArmDesign } from "./support/designs";
import { freePort } from "./support/free-port";

const PORT = await freePort();
process.env.SMTP_HOST = "127.0.0.1";
process.env.SMTP_PORT = String(PORT);
process.env.NEXTAUTH_URL = "http://localhost:3999";
process.env.MAIL_FROM = "Cairn test <cairn@test.example>";
const FAST: RetryPolicy = { maxAttempts: 3, delaysMs: [200, 400], leaseMs: 60_000 };

const DESIGN = smallSingleArmDesign();

type User = PublicUser & { password: string };
let trialId: number;
let lookId: number;
let meetingId: number;
let admin: User, chair: User, member2: User, member3: User, statistician: User, sponsor: User;
const as = (u: User, cap: Parameters<typeof checkTrialAccess>[2] = "viewOpen"): Promise<TrialAccess> => checkTrialAccess(u, trialId, cap);

async function outcome(p: Promise<unknown>): Promise<number | "zod" | "ok"> {
  try {
    await p;
    return "ok";
  } catch (e) {
    if (e instanceof ZodError) return "zod";
    if (e instanceof HttpError) return e.status;
    throw e;
  }
}

async function rowCounts() {
  const n = async (t: string) => Number((await db(t).count({ n: "*" }).first())?.n);
  return { members: await n("committee_members"), votes: await n("committee_votes"), declarations: await n("conflict_declarations"), recommendations: await n("recommendations"), minutes: await n("meeting_minutes"), signatures: await n("signatures"), audit: await n("audit_events") };
}

const pdfText = (pdf: Buffer) => execFileSync("/usr/bin/pdftotext", ["-layout", "-", "-"], { input: pdf }).toString("utf8").replace(/\s+/g, " ");

beforeAll(async () => {
  await resetDatabase();
  [admin, chair, member2, member3, statistician, sponsor] = await Promise.all([
    makeUser({ isAdmin: true, name: "Admin (invented)" }),
    makeUser({ name: "Dr Chair Aldane (invented)" }),
    makeUser({ name: "Dr Member Brisk (invented)" }),
    makeUser({ name: "Dr Member Corra (invented)" }),
    makeUser({ name: "Stat Dunmore (invented)" }),
    makeUser({ name: "Sponsor Elkin (invented)" }),
  ]);
  trialId = await makeTrial();
  for (const u of [chair, member2, member3]) await giveRole(u.id, trialId, "dmc_member");
  await giveRole(statistician.id, trialId, "unblinded_statistician");
  await giveRole(sponsor.id, trialId, "sponsor");
  lookId = await db.transaction(async (tx) => {
    const design = await insertDesignVersion(tx, { trialId, spec: DESIGN, createdBy: null, amendmentReason: null });
    // The charter version's quorum: two voting members present.
    await tx("designs").where({ id: design.id }).update({ dmc_quorum: 2 });
    const sig = await insertSignature(tx, { userId: statistician.id, signerName: statistician.name, signerEmail: statistician.email, meaning: "design approved", entityType: "design", entityId: design.id, record: DESIGN });
    await markDesignLocked(tx, design.id, sig.id);
    await createPlannedLooks(tx, trialId, design.id, [10, 20, 30]);
    const look = await tx("analyses").where({ trial_id: trialId, look_number: 1 }).first();
    const arm = await tx("arms").where({ trial_id: trialId }).first();
    await replaceArmCounts(tx, look.id, [{ armId: arm.id, enrolled: 10, treated: null, evaluable: 10, responders: 4, toxicities: null }]);
    await tx("analyses").where({ id: look.id }).update({ status: "locked", cutoff_date: "2026-05-01", enrolled_total: 10, locked_at: new Date() });
    return look.id as number;
  });
  meetingId = await db.transaction((tx) =>
    insertMeeting(tx, { trialId, analysisId: lookId, scheduledAt: new Date("2026-06-01T09:00:00Z"), timeZone: "Europe/Oslo", openAgenda: "1. Accrual", closedAgenda: "2. Closed review", reminderDaysBefore: 3, createdBy: statistician.id, attendeeUserIds: [chair.id, member2.id, member3.id, statistician.id, sponsor.id] }),
  );
});

describe("the committee's make-up", () => {
  it("an administrator seats the chair, voting members and the statistician; a second chair writes nothing", async () => {
    const a = await as(admin, "manageCommittee");
    await addCommitteeMember(a, { userId: chair.id, role: "chair" });
    await addCommitteeMember(a, { userId: member2.id, role: "voting" });
    await addCommitteeMember(a, { userId: statistician.id, role: "statistician" });
    const before = await rowCounts();
    expect(await outcome(addCommitteeMember(a, { userId: member3.id, role: "chair" }))).toBe(409);
    // The database refuses a second chair too, whatever the service does.
    await expect(db("committee_members").insert({ trial_id: trialId, user_id: member3.id, member_role: "chair", chair_of_trial_id: trialId })).rejects.toThrow(/Duplicate/);
    expect(await outcome(addCommitteeMember(a, { userId: sponsor.id, role: "voting" }))).toBe(422);
    expect(await outcome(addCommitteeMember(a, {}))).toBe("zod");
    expect(await rowCounts()).toEqual(before);
    await addCommitteeMember(a, { userId: member3.id, role: "voting" });
    expect((await fetchCommittee(trialId)).map((m) => [m.name, m.role])).toEqual([
      [chair.name, "chair"],
      [member2.name, "voting"],
      [member3.name, "voting"],
      [statistician.name, "statistician"],
    ]);
  });

  it("only an administrator changes the chair, and the change is audited", async () => {
    expect(await outcome(as(chair, "manageCommittee"))).toBe(403);
    const a = await as(admin, "manageCommittee");
    const c = await fetchCommittee(trialId);
    const m2 = c.find((m) => m.userId === member2.id)!;
    const stat = c.find((m) => m.userId === statistician.id)!;
    expect(await outcome(changeCommitteeChair(a, { memberId: stat.id, rowVersion: stat.rowVersion }))).toBe(422);
    await changeCommitteeChair(a, { memberId: m2.id, rowVersion: m2.rowVersion });
    const audit = await db("audit_events").where({ action: "committee_chair_changed" }).orderBy("id", "desc").first();
    expect(JSON.parse(audit.old_values)).toEqual({ chairUserId: chair.id });
    expect(JSON.parse(audit.new_values)).toEqual({ chairUserId: member2.id });
    // And back, so the rest of the file has the first chair.
    const back = (await fetchCommittee(trialId)).find((m) => m.userId === chair.id)!;
    await changeCommitteeChair(a, { memberId: back.id, rowVersion: back.rowVersion });
    expect((await fetchCommittee(trialId)).filter((m) => m.role === "chair").map((m) => m.userId)).toEqual([chair.id]);
  });
});

describe("declarations and votes", () => {
  it("a voter must declare first; a conflicted member's vote and the non-voting statistician's vote are refused", async () => {
    const vote = (u: User) => as(u, "recordRecommendation").then((a) => castVote(a, { meetingId, decision: "continue", password: u.password }));
    expect(await outcome(vote(chair))).toBe(409); // no declaration yet
    for (const u of [chair, member2]) await declareConflicts(await as(u, "recordRecommendation"), { meetingId, hasConflict: "no", password: u.password });
    expect(await outcome(declareConflicts(await as(member3, "recordRecommendation"), { meetingId, hasConflict: "yes", statement: "", password: member3.password }))).toBe("zod");
    await declareConflicts(await as(member3, "recordRecommendation"), { meetingId, hasConflict: "yes", statement: "Consults for the sponsor (invented)", password: member3.password });
    const before = await rowCounts();
    expect(await outcome(vote(member3))).toBe(403);
    expect(await outcome(as(statistician, "recordRecommendation"))).toBe(403); // not a DMC role at all
    // Even holding the DMC role, a member seated as the committee's statistician does not vote.
    await giveRole(statistician.id, trialId, "dmc_member").catch(() => undefined);
    expect(await outcome(as(statistician, "recordRecommendation").then((a) => castVote(a, { meetingId, decision: "continue", password: statistician.password })))).toBe(403);
    expect(await outcome(as(chair, "recordRecommendation").then((a) => castVote(a, { meetingId, decision: "", password: chair.password })))).toBe("zod");
    expect(await rowCounts()).toEqual(before);
    await db("trial_memberships").where({ trial_id: trialId, user_id: statistician.id, role: "dmc_member" }).del();
    await vote(chair);
    await as(member2, "recordRecommendation").then((a) => castVote(a, { meetingId, decision: "continue_modified", comment: "Closed comment: widen the safety review (invented)", password: member2.password }));
    expect(await outcome(vote(chair))).toBe(409); // one vote per member
  });

  it("the blinded account cannot select a vote, not even a count; the application's account cannot change one", async () => {
    await expect(blindDb("committee_votes").count({ n: "*" })).rejects.toThrow(/denied/i);
    await expect(db("committee_votes").where({ meeting_id: meetingId }).update({ decision: "stop_safety" })).rejects.toThrow(/denied/i);
    await expect(db("conflict_declarations").where({ meeting_id: meetingId }).del()).rejects.toThrow(/denied/i);
    const audit = await db("audit_events").where({ action: "committee_vote_cast" });
    expect(audit.every((r: { visibility: string }) => r.visibility === "closed")).toBe(true);
  });

  it("nor count the votes through their signatures: the signatures table is refused and the open view has no vote row", async () => {
    const voteSignatures = Number((await db("signatures").where({ meaning: "vote cast" }).count({ n: "*" }).first())?.n);
    // The positive control: votes were signed, so there is something to hide.
    expect(voteSignatures).toBeGreaterThan(0);
    await expect(blindDb("signatures").count({ n: "*" })).rejects.toThrow(/denied/i);
    expect(Number((await blindDb("signatures_open").where({ meaning: "vote cast" }).count({ n: "*" }).first())?.n)).toBe(0);
    // Every other signature stays readable: the view drops the vote rows and nothing else.
    const all = Number((await db("signatures").count({ n: "*" }).first())?.n);
    expect(Number((await blindDb("signatures_open").count({ n: "*" }).first())?.n)).toBe(all - voteSignatures);
  });
});

describe("the committee's recommendation", () => {
  const record = (u: User, extra: Record<string, unknown> = {}) =>
    as(u, "recordRecommendation").then((a) => recordRecommendation(a, lookId, { decision: "continue", rationale: "Closed rationale of the committee (invented).", meetingId, dissent: "Closed dissent: one member asked for a modification (invented).", password: u.password, ...extra }));

  it("is refused when the closed session was not quorate, and writes nothing", async () => {
    await recordSessionAttendance(await as(statistician, "viewClosed"), { meetingId, session: "closed", attendedIds: [chair.id, statistician.id] });
    const before = await rowCounts();
    const e = await record(chair).catch((x) => x);
    expect(e).toBeInstanceOf(HttpError);
    expect((e as HttpError).status).toBe(409);
    expect((e as HttpError).message).toMatch(/not quorate: 1 voting member present, 2 required by the charter/);
    expect(await rowCounts()).toEqual(before);
  });

  it("is the chair's alone: another voting member is refused, and a meeting must be named", async () => {
    await recordSessionAttendance(await as(statistician, "viewClosed"), { meetingId, session: "closed", attendedIds: [chair.id, member2.id, member3.id, statistician.id] });
    const before = await rowCounts();
    expect(await outcome(record(member2))).toBe(403);
    expect(await outcome(record(chair, { meetingId: "" }))).toBe(422);
    expect(await rowCounts()).toEqual(before);
  });

  it("is refused when a voter has a declared conflict", async () => {
    // Forced past the vote check straight into the table: the recording must still refuse it.
    const owner = ownerKnex();
    const sig = await db("signatures").where({ user_id: member3.id }).first("id");
    const [forced] = await owner("committee_votes").insert({ meeting_id: meetingId, analysis_id: lookId, user_id: member3.id, decision: "stop_futility", signature_id: sig.id });
    try {
      const before = await rowCounts();
      const e = await record(chair).catch((x) => x);
      expect((e as HttpError).status).toBe(409);
      expect((e as HttpError).message).toMatch(/declared a conflict/);
      expect(await rowCounts()).toEqual(before);
    } finally {
      await owner("committee_votes").where({ id: forced }).del();
      await owner.destroy();
    }
  });

  it("the chair records it with the tally and the dissent (closed); the open side sees only the decision", async () => {
    const r = await record(chair);
    const closed = await fetchMeetingRecommendationsClosed(meetingId, (await as(chair, "viewClosed")).closed!);
    expect(closed[0]).toMatchObject({ id: r.id, decision: "continue", tally: { continue: 1, continue_modified: 1 }, dissent: "Closed dissent: one member asked for a modification (invented)." });
    const open = await fetchRecommendationsOpen(trialId, blindDb);
    expect(open[0]).toMatchObject({ id: r.id, decision: "continue" });
    expect(JSON.stringify(open)).not.toMatch(/tally|dissent|Closed/);
    await expect(blindDb("recommendations").select("tally_json")).rejects.toThrow(/denied/i);
    const audit = await db("audit_events").where({ action: "recommendation_recorded", entity_id: String(r.id) }).first();
    expect(audit.visibility).toBe("open");
    expect(audit.new_values).not.toMatch(/tally|dissent|Closed/);
  });
});

describe("minutes", () => {
  it("a draft needs text; the chair alone approves; approved minutes are immutable and a correction is a new version", async () => {
    const stat = await as(statistician, "viewClosed");
    const before = await rowCounts();
    expect(await outcome(saveMinutesDraft(stat, { meetingId, session: "open", body: "   " }))).toBe("zod");
    expect(await rowCounts()).toEqual(before);
    await saveMinutesDraft(stat, { meetingId, session: "open", body: "Open session: accrual reviewed; no questions from the sponsor (invented)." });
    await saveMinutesDraft(stat, { meetingId, session: "closed", body: "Closed session: the committee discussed the closed report (invented)." });
    expect(await outcome(saveMinutesDraft(await as(sponsor), { meetingId, session: "closed", body: "A sponsor may not write closed minutes." }))).toBe(403);
    expect(await outcome(approveMinutes(await as(member2, "recordRecommendation"), { meetingId, session: "open", password: member2.password }))).toBe(403);
    await approveMinutes(await as(chair, "recordRecommendation"), { meetingId, session: "open", password: chair.password });
    const approved = await db("meeting_minutes").where({ meeting_id: meetingId, session: "open", version: 1 }).first();
    expect(approved.approval_signature_id).not.toBeNull();
    // Nobody can change or remove the approved version, not even the database owner.
    const owner = ownerKnex();
    try {
      await expect(owner("meeting_minutes").where({ id: approved.id }).update({ body: "Rewritten" })).rejects.toThrow(/never changed/);
      await expect(owner("meeting_minutes").where({ id: approved.id }).del()).rejects.toThrow(/never removed/);
    } finally {
      await owner.destroy();
    }
    // Editing the approved version (naming its row version) is refused; a new draft is version 2.
    expect(await outcome(saveMinutesDraft(stat, { meetingId, session: "open", body: "Open session, corrected text (invented).", rowVersion: approved.row_version }))).toBe(409);
    const c = await saveMinutesDraft(stat, { meetingId, session: "open", body: "Open session, corrected: the sponsor asked about accrual (invented)." });
    expect(c).toEqual({ version: 2, created: true });
    const open = await fetchOpenMinutes(meetingId);
    expect(open.map((m) => [m.version, m.approved])).toEqual([
      [2, false],
      [1, true],
    ]);
    expect(open[1].body).toBe(approved.body);
  });

  it("blinded readers get the open minutes only: the closed table is refused and the view has no closed row", async () => {
    await expect(blindDb("meeting_minutes").count({ n: "*" })).rejects.toThrow(/denied/i);
    const rows = await blindDb("meeting_minutes_open").select("session", "body");
    expect(rows.length).toBeGreaterThan(0);
    expect(rows.every((r: { session: string }) => r.session === "open")).toBe(true);
    expect(JSON.stringify(rows)).not.toMatch(/Closed session/);
  });
});

describe("the letter to the sponsor", () => {
  let dir: string;
  let catcher: ChildProcess | null = null;
  const portOpen = () =>
    new Promise<boolean>((resolve) => {
      const s = net.connect(PORT, "127.0.0.1");
      s.once("connect", () => (s.destroy(), resolve(true)));
      s.once("error", () => resolve(false));
    });
  beforeAll(async () => {
    dir = await mkdtemp(path.join(os.tmpdir(), "cairn-letter-mail-"));
    catcher = spawn(path.resolve("node_modules/.bin/tsx"), ["scripts/mail-catcher.ts", "--port", String(PORT), "--dir", dir], { stdio: "ignore", detached: true });
    for (let i = 0; i < 300 && !(await portOpen()); i++) await new Promise((r) => setTimeout(r, 100));
  });
  afterAll(async () => {
    if (catcher?.pid && catcher.exitCode === null) {
      const exited = new Promise((r) => catcher!.once("exit", r));
      process.kill(-catcher.pid, "SIGTERM");
      await exited;
    }
    await rm(dir, { recursive: true, force: true });
  });

  it("only the chair signs it; its text holds the decision and the caution and nothing closed", async () => {
    expect(await outcome(as(member2, "recordRecommendation").then((a) => signRecommendationLetter(a, { meetingId, password: member2.password })))).toBe(403);
    expect(await outcome(as(chair, "recordRecommendation").then((a) => signRecommendationLetter(a, { meetingId, password: "wrong" })))).toBe(422);
    const l = await signRecommendationLetter(await as(chair, "recordRecommendation"), { meetingId, password: chair.password });
    expect(l).toMatchObject({ version: 1, created: true });
    const again = await signRecommendationLetter(await as(chair, "recordRecommendation"), { meetingId, password: chair.password });
    expect(again).toMatchObject({ version: 1, created: false });
    const row = await blindDb("recommendation_letters").where({ id: l.id }).first();
    const text = pdfText(Buffer.from(row.pdf));
    expect(text).toContain("The data monitoring committee recommends: Continue as planned.");
    expect(text).toContain("Interim analysis: look 1");
    expect(text).toContain(CAUTION_TEXT.replace(/\s+/g, " "));
    expect(text).toContain(chair.name);
    for (const closed of ["Closed rationale", "Closed dissent", "Closed comment", "modification", "tally", "vote:", "4/10", "responders"]) expect(text).not.toContain(closed);
    expect(row.content_hash).toMatch(/^[0-9a-f]{64}$/);
  });

  it("is e-mailed to the sponsor's contacts with the PDF attached, and the delivery is logged", async () => {
    expect(await outcome(as(member2, "recordRecommendation").then((a) => queueLetterMail(a, { meetingId })))).toBe(403);
    const q = await queueLetterMail(await as(chair, "recordRecommendation"), { meetingId });
    expect(q.recipients).toBe(1);
    const results = await deliverWithRetries(q.ids, FAST);
    expect(Object.values(results)).toEqual(["sent"]);
    const files = (await readdir(dir)).filter((f) => f.endsWith(".eml"));
    const mails: ParsedMail[] = await Promise.all(files.map(async (f) => simpleParser(await readFile(path.join(dir, f)))));
    expect(mails).toHaveLength(1);
    const m = mails[0];
    expect((Array.isArray(m.to) ? m.to[0] : m.to)?.value[0]?.address).toBe(sponsor.email);
    expect(m.text).toContain("Caution.");
    expect(m.attachments.map((a) => a.filename)).toEqual([expect.stringMatching(/-dmc-recommendation-letter-v1\.pdf$/)]);
    expect(pdfText(m.attachments[0].content)).toContain("The data monitoring committee recommends: Continue as planned.");
    const logged = await db("audit_events").where({ action: "email_sent" }).orderBy("id", "desc").first();
    expect(JSON.parse(logged.new_values).to).toBe(sponsor.email);
    expect((await db("email_messages").where({ id: q.ids[0] }).first()).status).toBe("sent");
  });
});

describe("the quorum belongs to the charter", () => {
  it("is written only into a draft design version, carried into an amendment, and signed with the charter when locked", async () => {
    const admin_ = await as(admin, "editDesign");
    const before = await rowCounts();
    expect(await outcome(setCharterQuorum(admin_, { quorum: 3 }))).toBe(409); // only a locked version exists
    expect(await outcome(setCharterQuorum(admin_, { quorum: 0 }))).toBe("zod");
    expect(await rowCounts()).toEqual(before);
    expect(await outcome(as(sponsor, "editDesign"))).toBe(403);
    const v1 = await db("designs").where({ trial_id: trialId, version: 1 }).first();
    const draft = await amendDesign(admin_, v1.id, "Invented amendment: the charter's quorum rises to three.");
    expect(draft.dmc_quorum).toBe(2);
    await setCharterQuorum(admin_, { quorum: 3 });
    const stored = await db("designs").where({ id: draft.id }).first();
    expect(stored.dmc_quorum).toBe(3);
    expect(stored.row_version).toBe(draft.row_version + 1);
    await lockDesign(await as(statistician, "lockDesign"), draft.id, stored.row_version, statistician.password);
    const locked = await db("designs as d").join("signatures as s", "s.id", "d.signature_id").where("d.id", draft.id).first("s.record_hash", "d.version", "d.spec");
    expect(locked.record_hash).toBe(recordHash(designSignedRecord(trialId, locked.version, parseStoredDesign(locked.spec), 3)));
    expect(locked.record_hash).not.toBe(recordHash(designSignedRecord(trialId, locked.version, parseStoredDesign(locked.spec), 2)));
    // The reviewed look keeps the charter version it was locked under, and with it the quorum of two.
    expect(await fetchCharterQuorum(lookId)).toEqual({ quorum: 2, designVersion: 1 });
    const audit = await db("audit_events").where({ action: "design_quorum_set" }).first();
    expect(JSON.parse(audit.new_values)).toEqual({ version: 2, dmcQuorum: 3 });
  });
});
