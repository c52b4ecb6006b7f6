/**
 * Every write service re-checks the capability of the permission matrix (lib/auth/permissions.ts)
 * itself, against the real database: a caller whose role lacks it gets 403 and nothing is written
 * (every table's checksum, the audit trail's among them, is the same before and after); a caller
 * who holds it gets past the check (it then fails on the empty or incomplete body: 422, or 409 for
 * a look that is not open, and still writes nothing). The export walk at the end fails when a
 * service module gains an async export that has no row here, so a new service cannot be added
 * without saying which capability guards it.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import { ZodError } from "zod";
import { checkTrialAccess, type TrialAccess } from "@/lib/auth";
import { HttpError } from "@/lib/http";
import { insertDesignVersion } from "@/db/queries/designs";
import { createPlannedLooks } from "@/db/queries/analyses";
import type { PublicUser, TrialRole } from "@/db/types";
import * as analyses from "@/lib/analyses/service";
import * as design from "@/lib/design/service";
import * as committee from "@/lib/committee/service";
import * as meetings from "@/lib/meetings/service";
import * as votes from "@/lib/committee/votes";
import * as letter from "@/lib/committee/letter";
import * as review from "@/lib/review/record-recommendation";
import { db, giveRole, makeTrial, makeUser, ownerKnex, resetDatabase } from "./support/db";
import { smallSingleArmDesign } from "./support/designs";

const DESIGN = smallSingleArmDesign([15, 30]);

/** The callers: one per role on the fixture trial, and an administrator with no role on it. */
type Who = "statistician" | "dmc" | "sponsor" | "coordinator" | "admin";
const ROLE: Record<Exclude<Who, "admin">, TrialRole> = { statistician: "unblinded_statistician", dmc: "dmc_member", sponsor: "sponsor", coordinator: "coordinator" };
const EVERYONE: Who[] = ["statistician", "dmc", "sponsor", "coordinator", "admin"];

type User = PublicUser & { password: string };
let users: Record<Who, User>;
let trialId: number;
let lookId: number;
let designId: number;
let trialCode: string;
let owner: Knex;

/** The words of lib/auth's 403 for a capability (lib/http forbiddenError). */
const refusal = (words: string) => `Your role on this trial does not allow ${words}.`;

/**
 * One row per exported write service. `act` runs it for an access (or, for createTrial, a user)
 * with a body that cannot pass validation; `allowed` lists who holds the capability, and every
 * other caller is refused with `refused` as the message; `control` is what the first allowed
 * caller meets once past the check.
 */
type Row = {
  module: string;
  name: string;
  capability: string;
  allowed: Who[];
  refused: string;
  control: number;
} & ({ act: (a: TrialAccess) => Promise<unknown> } | { actAsUser: (u: User) => Promise<unknown> });

const ENTER = refusal("entering interim data");
const EDIT = refusal("editing the design");
const MEET = refusal("managing DMC meetings");
const RECOMMEND = refusal("recording a recommendation");
const COMMITTEE = refusal("changing the committee (an administrator's act)");
const bytes = new TextEncoder().encode("subject_id,arm,enrolment_date,evaluable,response\n");

const TABLE: Row[] = [
  // lib/analyses/service.ts: enterData (the unblinded statistician only; a DMC member is unblinded but does not enter data).
  { module: "analyses", name: "openLookForEntry", capability: "enterData", allowed: ["statistician"], refused: ENTER, control: 422, act: (a) => analyses.openLookForEntry(a, lookId, {}) },
  { module: "analyses", name: "saveArmCounts", capability: "enterData", allowed: ["statistician"], refused: ENTER, control: 422, act: (a) => analyses.saveArmCounts(a, lookId, {}) },
  // The look is still planned: past the check, a file is refused as 409 before anything is parsed.
  { module: "analyses", name: "previewPatientUpload", capability: "enterData", allowed: ["statistician"], refused: ENTER, control: 409, act: (a) => analyses.previewPatientUpload(a, lookId, bytes) },
  { module: "analyses", name: "confirmPatientUpload", capability: "enterData", allowed: ["statistician"], refused: ENTER, control: 409, act: (a) => analyses.confirmPatientUpload(a, lookId, bytes, { rowVersion: 1 }) },
  { module: "analyses", name: "lockAnalysis", capability: "enterData", allowed: ["statistician"], refused: ENTER, control: 422, act: (a) => analyses.lockAnalysis(a, lookId, {}) },
  { module: "analyses", name: "reopenAnalysis", capability: "enterData", allowed: ["statistician"], refused: ENTER, control: 422, act: (a) => analyses.reopenAnalysis(a, lookId, {}) },
  { module: "analyses", name: "switchToCountLevel", capability: "enterData", allowed: ["statistician"], refused: ENTER, control: 422, act: (a) => analyses.switchToCountLevel(a, lookId, {}) },
  // lib/design/service.ts: editDesign (statistician, administrator), lockDesign (statistician only).
  { module: "design", name: "createDraftDesign", capability: "editDesign", allowed: ["statistician", "admin"], refused: EDIT, control: 422, act: (a) => design.createDraftDesign(a, {}) },
  { module: "design", name: "updateDraftDesign", capability: "editDesign", allowed: ["admin", "statistician"], refused: EDIT, control: 422, act: (a) => design.updateDraftDesign(a, designId, 1, {}) },
  { module: "design", name: "lockDesign", capability: "lockDesign", allowed: ["statistician"], refused: refusal("locking the design"), control: 422, act: (a) => design.lockDesign(a, designId, 1, undefined) },
  { module: "design", name: "amendDesign", capability: "editDesign", allowed: ["statistician", "admin"], refused: EDIT, control: 422, act: (a) => design.amendDesign(a, designId, undefined) },
  // Creating a trial is not a trial-level act: an administrator, or someone who is unblinded statistician somewhere.
  // Past the check, a code already taken is answered as a field error and nothing is written.
  {
    module: "design",
    name: "createTrial",
    capability: "administrator or unblinded statistician",
    allowed: ["admin", "statistician"],
    refused: "Only an administrator or an unblinded statistician may create a trial.",
    control: 200,
    actAsUser: (u) =>
      design.createTrial(u, { code: trialCode, title: "A second trial (invented)", sponsorName: "Sponsor (invented)", phase: "II", designType: "single", endpointName: "Response", toxicityEndpointName: null, targetEnrolment: 40 } as Parameters<typeof design.createTrial>[1]),
  },
  // lib/committee/service.ts
  { module: "committee", name: "addCommitteeMember", capability: "manageCommittee", allowed: ["admin"], refused: COMMITTEE, control: 422, act: (a) => committee.addCommitteeMember(a, {}) },
  { module: "committee", name: "changeCommitteeChair", capability: "manageCommittee", allowed: ["admin"], refused: COMMITTEE, control: 422, act: (a) => committee.changeCommitteeChair(a, {}) },
  { module: "committee", name: "setCharterQuorum", capability: "editDesign", allowed: ["admin", "statistician"], refused: EDIT, control: 422, act: (a) => committee.setCharterQuorum(a, {}) },
  { module: "committee", name: "recordSessionAttendance", capability: "manageMeetings (open session)", allowed: ["coordinator", "statistician"], refused: MEET, control: 422, act: (a) => committee.recordSessionAttendance(a, { session: "open" }) },
  {
    module: "committee",
    name: "recordSessionAttendance",
    capability: "viewClosed (closed session)",
    allowed: ["statistician", "dmc"],
    refused: refusal("recording the closed session"),
    control: 422,
    act: (a) => committee.recordSessionAttendance(a, { session: "closed" }),
  },
  { module: "committee", name: "declareConflicts", capability: "recordRecommendation", allowed: ["dmc"], refused: RECOMMEND, control: 422, act: (a) => committee.declareConflicts(a, {}) },
  {
    module: "committee",
    name: "saveMinutesDraft",
    capability: "manageMeetings or recordRecommendation (open session)",
    allowed: ["coordinator", "dmc", "statistician"],
    refused: refusal("writing the minutes"),
    control: 422,
    act: (a) => committee.saveMinutesDraft(a, { session: "open" }),
  },
  { module: "committee", name: "saveMinutesDraft", capability: "viewClosed (closed session)", allowed: ["statistician", "dmc"], refused: refusal("writing the closed minutes"), control: 422, act: (a) => committee.saveMinutesDraft(a, { session: "closed" }) },
  { module: "committee", name: "approveMinutes", capability: "recordRecommendation", allowed: ["dmc"], refused: RECOMMEND, control: 422, act: (a) => committee.approveMinutes(a, {}) },
  // lib/committee/votes.ts and letter.ts: recordRecommendation (a DMC member); the seat and chair checks follow.
  { module: "votes", name: "castVote", capability: "recordRecommendation", allowed: ["dmc"], refused: RECOMMEND, control: 422, act: (a) => votes.castVote(a, {}) },
  { module: "letter", name: "signRecommendationLetter", capability: "recordRecommendation", allowed: ["dmc"], refused: RECOMMEND, control: 422, act: (a) => letter.signRecommendationLetter(a, {}) },
  { module: "letter", name: "queueLetterMail", capability: "recordRecommendation", allowed: ["dmc"], refused: RECOMMEND, control: 422, act: (a) => letter.queueLetterMail(a, {}) },
  // lib/meetings/service.ts: manageMeetings.
  { module: "meetings", name: "scheduleMeeting", capability: "manageMeetings", allowed: ["coordinator", "statistician"], refused: MEET, control: 422, act: (a) => meetings.scheduleMeeting(a, {}) },
  { module: "meetings", name: "recordMeetingAttendance", capability: "manageMeetings", allowed: ["coordinator", "statistician"], refused: MEET, control: 422, act: (a) => meetings.recordMeetingAttendance(a, {}) },
  { module: "meetings", name: "cancelMeeting", capability: "manageMeetings", allowed: ["coordinator", "statistician"], refused: MEET, control: 422, act: (a) => meetings.cancelMeeting(a, {}) },
  { module: "meetings", name: "retryFailedEmail", capability: "manageMeetings", allowed: ["coordinator", "statistician"], refused: MEET, control: 422, act: (a) => meetings.retryFailedEmail(a, {}) },
  // lib/review/record-recommendation.ts: recordRecommendation (a DMC member).
  { module: "review", name: "recordRecommendation", capability: "recordRecommendation", allowed: ["dmc"], refused: RECOMMEND, control: 422, act: (a) => review.recordRecommendation(a, lookId, {}) },
];

/** Async exports that write nothing, each with the reason it needs no row above. */
const READS: Record<string, string> = {
  "analyses.loadLookContext": "reads the look's open facts (status, arms, design limits) for pages and handlers that already checked access",
  "committee.meetingOf": "reads a meeting of access.trial (open data) for the acts above and the closed-session actions",
  "votes.committeeDecisionFacts": "reads the signed votes inside recordRecommendation's transaction, after its capability check",
};

const MODULES: Record<string, Record<string, unknown>> = { analyses, design, committee, votes, letter, meetings, review };

/** The access a caller gets with a capability every one of them holds; the service does the real check. */
const accessOf = (who: Who) => checkTrialAccess(users[who], trialId, "viewOpen");

/** 422 for a ZodError (as lib/http answers it), the status of an HttpError, 200 for no error. */
async function outcome(p: Promise<unknown>): Promise<{ status: number; message: string }> {
  try {
    await p;
    return { status: 200, message: "" };
  } catch (e) {
    if (e instanceof ZodError) return { status: 422, message: e.message };
    if (e instanceof HttpError) return { status: e.status, message: e.message };
    throw e;
  }
}

/** Every table's content checksum and the audit trail's row count: any write anywhere changes it. */
async function snapshot(): Promise<Record<string, string>> {
  const [tables] = (await owner.raw("SELECT table_name AS t FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' ORDER BY table_name")) as [Array<{ t: string }>];
  const [sums] = (await owner.raw(`CHECKSUM TABLE ${tables.map(({ t }) => `\`${t}\``).join(", ")}`)) as [Array<{ Table: string; Checksum: number | string | null }>];
  const [[audit]] = (await owner.raw("SELECT COUNT(*) AS n FROM audit_events")) as [Array<{ n: number }>];
  expect(sums.length).toBe(tables.length);
  expect(tables.map(({ t }) => t)).toContain("audit_events");
  return { auditRows: String(audit.n), ...Object.fromEntries(sums.map((r) => [r.Table, String(r.Checksum)])) };
}

const label = (r: Row) => `${r.module}.${r.name} (${r.capability})`;
const run = async (r: Row, who: Who) => ("act" in r ? r.act(await accessOf(who)) : r.actAsUser(users[who]));

beforeAll(async () => {
  await resetDatabase();
  owner = ownerKnex();
  const made = await Promise.all(EVERYONE.map((w) => makeUser({ name: `${w} Quillon (invented)`, isAdmin: w === "admin" })));
  users = Object.fromEntries(EVERYONE.map((w, i) => [w, made[i]])) as Record<Who, User>;
  trialId = await makeTrial();
  for (const w of EVERYONE) if (w !== "admin") await giveRole(users[w].id, trialId, ROLE[w]);
  trialCode = (await db("trials").where({ id: trialId }).first()).code;
  ({ lookId, designId } = await db.transaction(async (tx) => {
    const d = await insertDesignVersion(tx, { trialId, spec: DESIGN, createdBy: null, amendmentReason: null });
    await createPlannedLooks(tx, trialId, d.id, [15, 30]);
    return { designId: d.id, lookId: (await tx("analyses").where({ trial_id: trialId, look_number: 1 }).first()).id as number };
  }));
});
afterAll(async () => {
  await owner.destroy();
  await db.destroy();
});

describe("every write service re-checks its capability", () => {
  it("the table is consistent: every row names an async export of its module and at least one allowed and one refused caller", () => {
    for (const r of TABLE) {
      expect(typeof MODULES[r.module][r.name], label(r)).toBe("function");
      expect(r.allowed.length, label(r)).toBeGreaterThan(0);
      expect(EVERYONE.filter((w) => !r.allowed.includes(w)).length, label(r)).toBeGreaterThan(0);
    }
  });

  it.each(TABLE.map((r) => [label(r), r] as const))("%s: a caller without it gets 403 and nothing is written", async (_name, r) => {
    const before = await snapshot();
    for (const who of EVERYONE.filter((w) => !r.allowed.includes(w))) {
      const got = await outcome(run(r, who));
      expect(got, `${label(r)} as ${who}`).toEqual({ status: 403, message: r.refused });
    }
    expect(await snapshot()).toEqual(before);
  });

  it.each(TABLE.map((r) => [label(r), r] as const))("%s: a caller with it gets past the check (positive control) and nothing is written", async (_name, r) => {
    const before = await snapshot();
    for (const who of r.allowed) {
      const got = await outcome(run(r, who));
      expect(got.status, `${label(r)} as ${who}: ${got.message}`).toBe(r.control);
    }
    expect(await snapshot()).toEqual(before);
  });

  it("every async export of the service modules has a row in the table (or is a listed read)", () => {
    const covered = new Set([...TABLE.map((r) => `${r.module}.${r.name}`), ...Object.keys(READS)]);
    const missing: string[] = [];
    let seen = 0;
    for (const [m, mod] of Object.entries(MODULES))
      for (const [name, value] of Object.entries(mod)) {
        if (typeof value !== "function" || value.constructor.name !== "AsyncFunction") continue;
        seen++;
        if (!covered.has(`${m}.${name}`)) missing.push(`${m}.${name}`);
      }
    expect(missing).toEqual([]);
    // The walk sees the services themselves (a build that compiled async functions away would see none).
    expect(seen).toBe(new Set(TABLE.map((r) => `${r.module}.${r.name}`)).size + Object.keys(READS).length);
  });
});
