/**
 * Attacks a blinded role could try with what Cairn shows it, written as tests: each must fail to
 * learn anything closed. Every attack also runs once against a record where it must succeed
 * (a positive control), so a test that cannot find anything is not mistaken for a defence.
 */
import { beforeAll, describe, expect, it, vi } from "vitest";
import { createHash } from "node:crypto";
import { insertDesignVersion, markDesignLocked } from "@/db/queries/designs";
import { insertSignature, stableStringify } from "@/db/queries/signatures";
import { createPlannedLooks } from "@/db/queries/analyses";
import { SINGLE_ARM_DEMO_DESIGN } from "@/db/seeds/demo";
import { expandLooks } from "@/lib/stats/looks";
import { lockAnalysis, openLookForEntry, saveArmCounts } from "@/lib/analyses/service";
import { GET as auditGet } from "@/app/api/trials/[trialId]/audit/route";
import { generateOpenPacketAction, scheduleMeeting } from "@/app/trials/[trialId]/meetings/actions";
import { prepareClosedPacketAction } from "@/app/trials/[trialId]/review/[analysisId]/packet-actions";
import * as closedQueries from "@/db/queries/closed";
import { insertMeeting } from "@/db/queries/meetings";
import { checkTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { StatsDomainError } from "@/lib/stats/validate";
import { actAs, currentClaims, currentSession, routeContext } from "./support/as-user";
import { db, giveRole, makeTrial, makeUser, resetDatabase } from "./support/db";
import type { PublicUser } from "@/db/types";
/** The statistician's access for the data-entry services (they re-check enterData themselves). */
const enter = (u: Parameters<typeof checkTrialAccess>[0], trialId: number) => checkTrialAccess(u, trialId, "enterData");

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));
// The closed reads the packet code uses, wrapped (unchanged) so a test can tell whether they ran.
vi.mock("@/db/queries/closed", async (importOriginal) => {
  const m = await importOriginal<typeof import("@/db/queries/closed")>();
  return { ...m, fetchArmCountsForTrial: vi.fn(m.fetchArmCountsForTrial), fetchClosedAgenda: vi.fn(m.fetchClosedAgenda) };
});

type Member = PublicUser & { password: string };
let stat: Member;
let sponsor: Member;
let coordinator: Member;
let trialId: number;
let analysisId: number;
let armId: number;
// The closed truth the attacker is after (invented numbers).
const SECRET = { enrolled: 14, treated: 14 as number | null, evaluable: 13, responders: 5, toxicities: 2 as number | null };

const plainSha256 = (s: string) => createHash("sha256").update(s).digest("hex");
const HEX64 = /\b[0-9a-f]{64}\b/g;

/**
 * The brute force: every count combination consistent with the open enrolled total, hashed the way
 * the signed lock record is built, compared with every 64-hex value the blinded answer contains.
 * Returns the counts it recovered, or null.
 */
function bruteForceCounts(visible: { trialId: number; analysisId: number; lookNumber: number; amendment: number; cutoffDate: string; enrolled: number; armId: number }, hashes: Set<string>) {
  const e = visible.enrolled;
  for (let ev = 0; ev <= e; ev++)
    for (let r = 0; r <= ev; r++)
      for (const tr of [null, ...Array.from({ length: e + 1 }, (_, i) => i)])
        for (const tox of tr === null ? [null] : Array.from({ length: tr + 1 }, (_, i) => i)) {
          const record = { trialId: visible.trialId, analysisId: visible.analysisId, lookNumber: visible.lookNumber, amendment: visible.amendment, cutoffDate: visible.cutoffDate, counts: [{ armId: visible.armId, enrolled: e, treated: tr, evaluable: ev, responders: r, toxicities: tox }] };
          if (hashes.has(plainSha256(stableStringify(record)))) return { enrolled: e, treated: tr, evaluable: ev, responders: r, toxicities: tox };
        }
  return null;
}

async function auditAs(user: PublicUser) {
  actAs(user.id);
  const res = await auditGet(new Request(`http://localhost/api/trials/${trialId}/audit`), routeContext({ trialId: String(trialId) }));
  expect(res.status).toBe(200);
  return (await res.json()) as { openOnly: boolean; entries: Array<{ action: string; newValues: Record<string, unknown> | null }> };
}

beforeAll(async () => {
  await resetDatabase();
  stat = await makeUser({ name: "Test statistician" });
  sponsor = await makeUser({ name: "Test sponsor" });
  trialId = await makeTrial({ designType: "single" });
  await giveRole(stat.id, trialId, "unblinded_statistician");
  await giveRole(sponsor.id, trialId, "sponsor");
  coordinator = await makeUser({ name: "Test coordinator" });
  await giveRole(coordinator.id, trialId, "coordinator");
  const design = SINGLE_ARM_DEMO_DESIGN;
  await db.transaction(async (tx) => {
    const d = await insertDesignVersion(tx, { trialId, spec: design, createdBy: stat.id, amendmentReason: null });
    const sig = await insertSignature(tx, { userId: stat.id, signerName: stat.name, signerEmail: stat.email, meaning: "design approved", entityType: "design", entityId: d.id, record: design });
    await markDesignLocked(tx, d.id, sig.id);
    await createPlannedLooks(tx, trialId, d.id, expandLooks(design.looks, design.nMax));
  });
  armId = (await db("arms").where({ trial_id: trialId }).first()).id;
  analysisId = (await db("analyses").where({ trial_id: trialId }).orderBy("look_number").first()).id;
  await openLookForEntry(await enter(stat, trialId), analysisId, { rowVersion: 1, cutoffDate: "2026-05-31" });
  await saveArmCounts(await enter(stat, trialId), analysisId, { rowVersion: 2, cutoffDate: "2026-05-31", counts: [{ armId, ...SECRET }] });
  await lockAnalysis(await enter(stat, trialId), analysisId, { rowVersion: 3, password: stat.password });
});

describe("a blinded role cannot recover closed values from the audit trail", () => {
  it("the brute force works on an unkeyed hash of the lock record (positive control)", () => {
    const visible = { trialId, analysisId, lookNumber: 1, amendment: 0, cutoffDate: "2026-05-31", enrolled: SECRET.enrolled, armId };
    const record = { ...visible, counts: [{ armId, ...SECRET }] } as Record<string, unknown>;
    delete record.enrolled;
    delete record.armId;
    const started = Date.now();
    expect(bruteForceCounts(visible, new Set([plainSha256(stableStringify(record))]))).toEqual(SECRET);
    expect(Date.now() - started).toBeLessThan(10_000);
  });

  it("a sponsor cannot recover look counts from the audit trail by trying values", async () => {
    const answer = await auditAs(sponsor);
    expect(answer.openOnly).toBe(true);
    const locked = answer.entries.find((e) => e.action === "analysis_locked");
    expect(locked, "the open lock entry is shown to the sponsor").toBeTruthy();
    const text = JSON.stringify(answer);
    const hashes = new Set(text.match(HEX64) ?? []);
    const visible = { trialId, analysisId, lookNumber: Number(locked!.newValues!.lookNumber), amendment: Number(locked!.newValues!.amendment), cutoffDate: String(locked!.newValues!.cutoffDate), enrolled: Number(locked!.newValues!.enrolledTotal), armId };
    expect(visible.enrolled).toBe(SECRET.enrolled);
    expect(bruteForceCounts(visible, hashes)).toBeNull();
  });

  it("a sponsor sees no hash of any audit row (row hash, previous hash, record hashes)", async () => {
    const answer = await auditAs(sponsor);
    const text = JSON.stringify(answer);
    expect(text.match(HEX64) ?? []).toEqual([]);
    for (const e of answer.entries) for (const k of Object.keys(e)) expect(k.toLowerCase()).not.toContain("hash");
  });

  it("the statistician (unblinded) still sees the row hashes (the stripping is per role)", async () => {
    const answer = await auditAs(stat);
    expect(answer.openOnly).toBe(false);
    expect((JSON.stringify(answer).match(HEX64) ?? []).length).toBeGreaterThan(0);
  });
});

describe("error messages to blinded roles carry no closed values", () => {
  // Counts no design allows (an invented, impossible value), stored behind the services' back,
  // so the engine throws while building the closed packet and its message quotes them.
  const TELL = 943;
  let meetingId: number;
  beforeAll(async () => {
    await db("analysis_arm_counts").where({ analysis_id: analysisId }).update({ enrolled: TELL, evaluable: TELL, responders: TELL, toxicities: TELL });
    meetingId = await db.transaction((tx) =>
      insertMeeting(tx, { trialId, analysisId, scheduledAt: new Date("2027-03-01T10:00:00Z"), timeZone: "UTC", openAgenda: "Accrual", closedAgenda: "Look 1", reminderDaysBefore: 1, createdBy: coordinator.id, attendeeUserIds: [] }),
    );
  });
  const form = () => {
    const f = new FormData();
    f.set("trialId", String(trialId));
    f.set("meetingId", String(meetingId));
    return f;
  };

  const closedForm = () => {
    const f = form();
    f.set("analysisId", String(analysisId));
    return f;
  };
  const closedReads = () => vi.mocked(closedQueries.fetchArmCountsForTrial).mock.calls.length + vi.mocked(closedQueries.fetchClosedAgenda).mock.calls.length;
  const closedPackets = async () => Number((await db("packets").where({ meeting_id: meetingId, audience: "closed" }).count({ n: "*" }))[0].n);

  it("the engine message does quote the closed value to the unblinded statistician preparing the closed packet (positive control)", async () => {
    actAs(stat.id);
    vi.mocked(closedQueries.fetchArmCountsForTrial).mockClear();
    vi.mocked(closedQueries.fetchClosedAgenda).mockClear();
    const r = await prepareClosedPacketAction({}, closedForm());
    expect(JSON.stringify(r)).toContain(String(TELL));
    expect(closedReads()).toBeGreaterThan(0);
  });

  it("a coordinator generates the open packet without any closed read, and cannot trigger the closed build at all", async () => {
    actAs(coordinator.id);
    vi.mocked(closedQueries.fetchArmCountsForTrial).mockClear();
    vi.mocked(closedQueries.fetchClosedAgenda).mockClear();
    const before = await closedPackets();
    const open = await generateOpenPacketAction({}, form());
    expect(open.ok).toMatch(/Open report: version \d+/);
    expect(JSON.stringify(open)).not.toContain(String(TELL));
    const closed = await prepareClosedPacketAction({}, closedForm());
    expect(closed.ok).toBeUndefined();
    expect(closed.error).toMatch(/does not allow/);
    expect(JSON.stringify(closed)).not.toContain(String(TELL));
    expect(closedReads()).toBe(0);
    expect(await closedPackets()).toBe(before);
  });

  it("a DMC member (closed reader, not an organiser) cannot prepare the closed packet either", async () => {
    const dmc = await makeUser({ name: "Test DMC member" });
    await giveRole(dmc.id, trialId, "dmc_member");
    actAs(dmc.id);
    const r = await prepareClosedPacketAction({}, closedForm());
    expect(r.error).toMatch(/does not allow/);
  });

  it("the closed-packet form refuses bad input with a message and writes nothing", async () => {
    actAs(stat.id);
    const before = await closedPackets();
    const garbage = closedForm();
    garbage.set("meetingId", "12abc");
    expect(await prepareClosedPacketAction({}, garbage)).toEqual({ error: "That meeting is not valid." });
    // The meeting exists but reviews this look, not another one: posted with a wrong look it is refused.
    const otherLook = closedForm();
    otherLook.set("analysisId", String(analysisId + 100000));
    expect((await prepareClosedPacketAction({}, otherLook)).error).toMatch(/not found for this look/);
    const noMeeting = closedForm();
    noMeeting.set("meetingId", "2147483000");
    expect((await prepareClosedPacketAction({}, noMeeting)).error).toMatch(/not found/);
    expect(await closedPackets()).toBe(before);
  });

  it("a route answering a blinded caller maps an engine error to generic text; an unblinded caller gets the detail", async () => {
    const route = (user: PublicUser) =>
      handle(async () => {
        await checkTrialAccess(user, trialId, "viewOpen");
        throw new StatsDomainError("n", TELL, "must not exceed the planned size");
      })();
    const blinded = await route(sponsor);
    expect(blinded.status).toBe(422);
    expect(JSON.stringify(await blinded.json())).not.toContain(String(TELL));
    const unblinded = await route(stat);
    expect(unblinded.status).toBe(422);
    expect(JSON.stringify(await unblinded.json())).toContain(String(TELL));
  });

  it("with no trial access decided at all, an engine error is generic (blinded by default)", async () => {
    const res = await handle(async () => {
      throw new StatsDomainError("n", TELL, "must not exceed the planned size");
    })();
    expect(JSON.stringify(await res.json())).not.toContain(String(TELL));
  });
});

describe("closed text stays out of open audit rows", () => {
  const CLOSED_TEXT = "Closed session: discuss the responder imbalance at look 1 (invented)";

  it("a sponsor cannot read the closed-session agenda in the audit trail (API and the rows the page and CSV export are drawn from)", async () => {
    actAs(coordinator.id);
    const f = new FormData();
    f.set("trialId", String(trialId));
    f.set("analysisId", String(analysisId));
    f.set("scheduledLocal", "2030-06-01T10:00");
    f.set("timeZone", "UTC");
    f.set("openAgenda", "Accrual and data timeliness");
    f.set("closedAgenda", CLOSED_TEXT);
    f.set("reminderDaysBefore", "2");
    const r = await scheduleMeeting({}, f);
    expect(r.ok, JSON.stringify(r)).toBeTruthy();
    const answer = await auditAs(sponsor);
    const scheduled = answer.entries.find((e) => e.action === "meeting_scheduled");
    expect(scheduled?.newValues?.openAgenda).toBe("Accrual and data timeliness");
    expect(JSON.stringify(answer)).not.toContain("responder imbalance");
    // The closed text is recorded, in a closed row the unblinded statistician reads.
    const closedRows = await db("audit_events").where({ action: "meeting_closed_agenda_set", visibility: "closed", entity_id: String(r.meetingId) });
    expect(closedRows).toHaveLength(1);
    expect(JSON.stringify(await auditAs(stat))).toContain("responder imbalance");
  });
});
