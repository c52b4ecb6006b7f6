/**
 * The meetings' write service (lib/meetings/service.ts) against the real database: it re-checks
 * manageMeetings itself, so a sponsor's or a DMC member's access is refused and writes nothing;
 * scheduling writes the meeting and its audit rows in one transaction (a connection killed midway
 * leaves neither), with the closed-session agenda only in a closed audit row; a stale row version
 * on attendance or cancellation is refused and changes nothing. Through the server actions, a
 * refused field reaches the form beside that field and a lost connection as a message.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { actAs, currentClaims, currentSession } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));
vi.mock("@/lib/mail/delivery", () => ({ ensureMailWorker: vi.fn(), deliverWithRetries: vi.fn(async () => ({})), deliverAfterResponse: vi.fn() }));

import { checkTrialAccess, type Capability, type TrialAccess } from "@/lib/auth";
import { HttpError } from "@/lib/http";
import { WriteNotSavedError } from "@/db/errors";
import { insertDesignVersion } from "@/db/queries/designs";
import { createPlannedLooks } from "@/db/queries/analyses";
import { insertMeeting } from "@/db/queries/meetings";
import { insertEmails } from "@/db/queries/emails";
import { cancelMeeting, recordMeetingAttendance, retryFailedEmail, scheduleMeeting } from "@/lib/meetings/service";
import { scheduleMeeting as scheduleMeetingAction } from "@/app/trials/[trialId]/meetings/actions";
import type { PublicUser } from "@/db/types";
import { db, giveRole, killMidTransaction, makeTrial, makeUser, resetDatabase } from "./support/db";
import { smallSingleArmDesign } from "./support/designs";

const DESIGN = smallSingleArmDesign([15, 30]);
const CLOSED_AGENDA = "Closed session: weigh the response imbalance between the halves of the cohort (invented)";
const REFUSED = "Your role on this trial does not allow managing DMC meetings.";

type User = PublicUser & { password: string };
let trialId: number;
let lookId: number;
let coordinator: User, statistician: User, sponsor: User, dmc: User;
const as = (u: User, cap: Capability = "viewOpen"): Promise<TrialAccess> => checkTrialAccess(u, trialId, cap);

async function counts() {
  const n = async (t: string) => Number((await db(t).count({ n: "*" }).first())?.n);
  return { meetings: await n("meetings"), attendees: await n("meeting_attendees"), audit: await n("audit_events"), emails: await n("email_messages") };
}

/** A meeting written straight to the database (its time may be in the past, which scheduling refuses). */
async function meetingAt(scheduledAt: Date, attendees: number[]): Promise<number> {
  return db.transaction((tx) =>
    insertMeeting(tx, { trialId, analysisId: lookId, scheduledAt, timeZone: "UTC", openAgenda: "1. Accrual", closedAgenda: "", reminderDaysBefore: 2, createdBy: coordinator.id, attendeeUserIds: attendees }),
  );
}
const meetingRow = (id: number) => db("meetings").where({ id }).first();
const attended = async (id: number) => (await db("meeting_attendees").where({ meeting_id: id }).orderBy("user_id")).map((r) => [r.user_id, r.attended === null ? null : Boolean(r.attended)]);
const auditOf = (action: string, entityId: number) => db("audit_events").where({ action, entity_id: String(entityId) });

const futureLocal = () => `${new Date().getUTCFullYear() + 1}-03-15T14:30`;
function scheduleInput(over: Record<string, unknown> = {}) {
  return { analysisId: String(lookId), scheduledLocal: futureLocal(), timeZone: "Europe/Oslo", attendeeIds: [String(dmc.id), String(sponsor.id)], openAgenda: "1. Accrual and timeliness", closedAgenda: CLOSED_AGENDA, reminderDaysBefore: "2", ...over };
}

async function failedEmail(meetingId: number): Promise<number> {
  const [id] = await db.transaction((tx) =>
    insertEmails(tx, [{ trialId, meetingId, packetId: null, toUserId: dmc.id, toAddress: dmc.email, subject: "Reminder (invented)", kind: "meeting_reminder", bodyText: "Reminder", createdBy: coordinator.id }], new Date()),
  );
  await db("email_messages").where({ id }).update({ status: "failed", attempts: 3 });
  return id;
}

beforeAll(async () => {
  await resetDatabase();
  [coordinator, statistician, sponsor, dmc] = await Promise.all([
    makeUser({ name: "Coordinator Fenwick (invented)" }),
    makeUser({ name: "Statistician Galloway (invented)" }),
    makeUser({ name: "Sponsor Hartigan (invented)" }),
    makeUser({ name: "Dr Member Ivers (invented)" }),
  ]);
  trialId = await makeTrial();
  await giveRole(coordinator.id, trialId, "coordinator");
  await giveRole(statistician.id, trialId, "unblinded_statistician");
  await giveRole(sponsor.id, trialId, "sponsor");
  await giveRole(dmc.id, trialId, "dmc_member");
  lookId = await db.transaction(async (tx) => {
    const design = await insertDesignVersion(tx, { trialId, spec: DESIGN, createdBy: null, amendmentReason: null });
    await createPlannedLooks(tx, trialId, design.id, [15, 30]);
    return (await tx("analyses").where({ trial_id: trialId, look_number: 1 }).first()).id as number;
  });
});
afterAll(async () => {
  await db.destroy();
});

describe("the service re-checks manageMeetings itself", () => {
  it("refuses a sponsor's and a DMC member's access to every act with 403 and writes nothing", async () => {
    const past = await meetingAt(new Date(Date.now() - 3_600_000), [dmc.id, sponsor.id]);
    const future = await meetingAt(new Date(Date.now() + 30 * 86_400_000), [dmc.id]);
    const emailId = await failedEmail(future);
    const before = { counts: await counts(), past: await meetingRow(past), future: await meetingRow(future), attended: await attended(past) };
    for (const who of [sponsor, dmc]) {
      const a = await as(who);
      const acts: [string, Promise<unknown>][] = [
        ["schedule", scheduleMeeting(a, scheduleInput())],
        ["attendance", recordMeetingAttendance(a, { meetingId: past, rowVersion: before.past.row_version, attendedIds: [dmc.id] })],
        ["cancel", cancelMeeting(a, { meetingId: future, rowVersion: before.future.row_version })],
        ["retry", retryFailedEmail(a, { emailId })],
      ];
      for (const [name, p] of acts) {
        const e = await p.then(() => null, (x: unknown) => x);
        expect(e, `${who.name}: ${name}`).toBeInstanceOf(HttpError);
        expect((e as HttpError).status, `${who.name}: ${name}`).toBe(403);
        expect((e as HttpError).message).toBe(REFUSED);
      }
    }
    expect(await counts()).toEqual(before.counts);
    expect(await meetingRow(past)).toEqual(before.past);
    expect(await meetingRow(future)).toEqual(before.future);
    expect(await attended(past)).toEqual(before.attended);
    expect((await db("email_messages").where({ id: emailId }).first()).status).toBe("failed");

    // Positive control: the coordinator's manageMeetings access does the same acts.
    const c = await as(coordinator, "manageMeetings");
    await recordMeetingAttendance(c, { meetingId: past, rowVersion: before.past.row_version, attendedIds: [dmc.id] });
    expect((await meetingRow(past)).status).toBe("held");
    await retryFailedEmail(c, { emailId });
    expect((await db("email_messages").where({ id: emailId }).first()).status).toBe("queued");
    await cancelMeeting(c, { meetingId: future, rowVersion: before.future.row_version });
    expect((await meetingRow(future)).status).toBe("cancelled");
    expect((await counts()).audit).toBe(before.counts.audit + 3);
  });
});

describe("scheduling", () => {
  it("writes the meeting, its invitees and its audit rows; the closed agenda only in a closed row", async () => {
    const before = await counts();
    const { meetingId } = await scheduleMeeting(await as(coordinator, "manageMeetings"), scheduleInput());
    const m = await meetingRow(meetingId);
    expect(m.closed_agenda).toBe(CLOSED_AGENDA);
    // 15 March 14:30 in Oslo is 13:30 UTC (standard time, UTC+01:00, until the last Sunday of March).
    expect(new Date(m.scheduled_at).toISOString()).toBe(`${new Date().getUTCFullYear() + 1}-03-15T13:30:00.000Z`);
    expect(await attended(meetingId)).toEqual([dmc.id, sponsor.id].sort((x, y) => x - y).map((u) => [u, null]));
    const open = await auditOf("meeting_scheduled", meetingId);
    expect(open).toHaveLength(1);
    expect(open[0].visibility).toBe("open");
    expect(JSON.parse(open[0].new_values).openAgenda).toBe("1. Accrual and timeliness");
    expect(JSON.stringify(open[0])).not.toContain("response imbalance");
    const closed = await auditOf("meeting_closed_agenda_set", meetingId);
    expect(closed).toHaveLength(1);
    expect(closed[0].visibility).toBe("closed");
    expect(JSON.parse(closed[0].new_values)).toEqual({ closedAgenda: CLOSED_AGENDA });
    expect(await counts()).toMatchObject({ meetings: before.meetings + 1, attendees: before.attendees + 2, audit: before.audit + 2 });
  });

  it("without a closed agenda there is no closed row", async () => {
    const { meetingId } = await scheduleMeeting(await as(coordinator, "manageMeetings"), scheduleInput({ closedAgenda: "   " }));
    expect(await auditOf("meeting_scheduled", meetingId)).toHaveLength(1);
    expect(await auditOf("meeting_closed_agenda_set", meetingId)).toHaveLength(0);
  });

  it("is one transaction: a connection killed at the audit row leaves no meeting behind", async () => {
    const before = await counts();
    const agenda = "Killed midway (invented)";
    let peeked = -1;
    const err = await killMidTransaction(
      async () => scheduleMeeting(await as(coordinator, "manageMeetings"), scheduleInput({ openAgenda: agenda })),
      async (owner) => {
        // Mid-transaction the meeting row is there, uncommitted.
        const row = await owner.transaction(async (trx) => trx("meetings").where({ open_agenda: agenda }).count({ n: "*" }).first(), { isolationLevel: "read uncommitted" });
        peeked = Number(row?.n);
      },
    );
    expect(peeked).toBe(1);
    expect(err).toBeInstanceOf(WriteNotSavedError);
    expect(await counts()).toEqual(before);
    expect(await db("meetings").where({ open_agenda: agenda })).toHaveLength(0);
  });

  it("refuses a field with its name and writes nothing: a time in the past, another trial's look, a non-member", async () => {
    const other = await makeTrial();
    const otherLook = await db.transaction(async (tx) => {
      const design = await insertDesignVersion(tx, { trialId: other, spec: DESIGN, createdBy: null, amendmentReason: null });
      await createPlannedLooks(tx, other, design.id, [15, 30]);
      return (await tx("analyses").where({ trial_id: other, look_number: 1 }).first()).id as number;
    });
    const outsider = await makeUser();
    const before = await counts();
    const c = await as(coordinator, "manageMeetings");
    const cases: [Record<string, unknown>, string, string][] = [
      [{ scheduledLocal: "2020-01-06T10:00" }, "scheduledLocal", "Choose a time in the future."],
      [{ analysisId: String(otherLook) }, "analysisId", "Choose an analysis of this trial."],
      [{ attendeeIds: [String(outsider.id)] }, "attendeeIds", "Attendees must be members of this trial."],
    ];
    for (const [over, field, message] of cases) {
      const e = await scheduleMeeting(c, scheduleInput(over)).then(() => null, (x: unknown) => x);
      expect(e).toBeInstanceOf(HttpError);
      expect(e).toMatchObject({ status: 422, message, details: { field } });
    }
    expect(await counts()).toEqual(before);
  });
});

describe("a stale row version changes nothing", () => {
  it("attendance recorded by someone else first: the second save with the old version is refused", async () => {
    const id = await meetingAt(new Date(Date.now() - 3_600_000), [dmc.id, sponsor.id]);
    const loaded = (await meetingRow(id)).row_version;
    await recordMeetingAttendance(await as(statistician, "manageMeetings"), { meetingId: id, rowVersion: loaded, attendedIds: [dmc.id] });
    const after = { row: await meetingRow(id), attended: await attended(id), counts: await counts() };
    expect(after.row.status).toBe("held");
    const e = await recordMeetingAttendance(await as(coordinator, "manageMeetings"), { meetingId: id, rowVersion: loaded, attendedIds: [sponsor.id] }).then(() => null, (x: unknown) => x);
    expect(e).toMatchObject({ status: 409, message: "Someone else changed this meeting since you opened it. Reload the page and record attendance again." });
    expect(await meetingRow(id)).toEqual(after.row);
    expect(await attended(id)).toEqual(after.attended);
    expect(await counts()).toEqual(after.counts);
  });

  it("a cancellation with an old version is refused; with the current one it goes through", async () => {
    const id = await meetingAt(new Date(Date.now() + 10 * 86_400_000), [dmc.id]);
    const loaded = (await meetingRow(id)).row_version;
    // Another edit of the meeting since the page was loaded.
    await db("meetings").where({ id }).increment("row_version", 1);
    const before = { row: await meetingRow(id), counts: await counts() };
    const c = await as(coordinator, "manageMeetings");
    const e = await cancelMeeting(c, { meetingId: id, rowVersion: loaded }).then(() => null, (x: unknown) => x);
    expect(e).toMatchObject({ status: 409, message: "Someone else changed this meeting since you opened it. Reload the page." });
    expect(await meetingRow(id)).toEqual(before.row);
    expect(await counts()).toEqual(before.counts);
    expect(await auditOf("meeting_cancelled", id)).toHaveLength(0);
    await cancelMeeting(c, { meetingId: id, rowVersion: before.row.row_version });
    expect((await meetingRow(id)).status).toBe("cancelled");
    expect(await auditOf("meeting_cancelled", id)).toHaveLength(1);
  });
});

describe("the server action answers every failure as form state", () => {
  function scheduleForm(over: Record<string, string> = {}): FormData {
    const f = new FormData();
    const v = { ...scheduleInput(), attendeeIds: undefined, trialId: String(trialId), ...over };
    for (const [k, x] of Object.entries(v)) if (typeof x === "string") f.set(k, x);
    f.append("attendeeIds", String(dmc.id));
    return f;
  }

  it("a refused field stands beside that field; a sponsor gets the role refusal", async () => {
    actAs(coordinator.id);
    expect(await scheduleMeetingAction({}, scheduleForm({ scheduledLocal: "2020-01-06T10:00" }))).toEqual({ error: "Check the highlighted fields.", fieldErrors: { scheduledLocal: ["Choose a time in the future."] } });
    const invalid = await scheduleMeetingAction({}, scheduleForm({ reminderDaysBefore: "61" }));
    expect(invalid).toEqual({ error: "Check the highlighted fields.", fieldErrors: { reminderDaysBefore: ["Enter 0 to 60 days."] } });
    actAs(sponsor.id);
    expect(await scheduleMeetingAction({}, scheduleForm())).toEqual({ error: REFUSED });
    actAs(coordinator.id);
    const ok = await scheduleMeetingAction({}, scheduleForm());
    expect(ok.ok).toBe("Meeting scheduled.");
  });

  it("a connection lost midway is a message on the form, not a thrown error", async () => {
    actAs(coordinator.id);
    const before = await counts();
    let state: Awaited<ReturnType<typeof scheduleMeetingAction>> | undefined;
    const err = await killMidTransaction(async () => {
      state = await scheduleMeetingAction({}, scheduleForm({ openAgenda: "Action killed midway (invented)" }));
    });
    expect(err).toBeNull();
    expect(state?.error).toMatch(/nothing was saved/);
    expect(state?.ok).toBeUndefined();
    expect(await counts()).toEqual(before);
  });
});
