/**
 * Meeting packets against the real database: generation per audience, versions and content
 * hashes, and the PDF's text (extracted with pdftotext from Debian's poppler-utils).
 */
import { execFileSync } from "node:child_process";
import { beforeAll, describe, expect, it } from "vitest";
import { db, resetDatabase } from "./support/db";
import { seedDemo } from "@/db/seeds/demo";
import { insertMeeting } from "@/db/queries/meetings";
import { fetchPacketPdf, fetchPackets } from "@/db/queries/packets";
import { fetchTrialByCode } from "@/db/queries/trials";
import { fetchUserByEmail, toPublicUser } from "@/db/queries/users";
import { generateOpenPacket } from "@/lib/packets/open-packet";
import { prepareClosedPacket } from "@/lib/packets/closed-packet";
import { asClosedConnection } from "@/db/knex";
import { mayDownloadPacket } from "@/lib/packets/access";
import { CAUTION_TEXT } from "@/components/caution";
import type { PublicUser, TrialRow } from "@/db/types";

function pdfText(pdf: Buffer): string {
  return execFileSync("/usr/bin/pdftotext", ["-layout", "-", "-"], { input: pdf }).toString("utf8");
}
function pdfPages(pdf: Buffer): number {
  const info = execFileSync("/usr/bin/pdfinfo", ["-"], { input: pdf }).toString("utf8");
  return Number(/Pages:\s+(\d+)/.exec(info)?.[1]);
}
/** pdftotext wraps long lines; compare text with all whitespace runs collapsed. */
const flat = (s: string) => s.replace(/\s+/g, " ");

let trial: TrialRow;
let coordinator: PublicUser;
let statistician: PublicUser;

/**
 * As the app does it: the coordinator generates the open packet from the meetings page, the
 * unblinded statistician prepares the closed one from the closed review (with the closed
 * connection lib/auth gives an unblinded access; taken directly here).
 */
async function generateBoth(t: TrialRow, m: number) {
  const open = await generateOpenPacket(t, m, coordinator);
  const closed = await prepareClosedPacket(t, m, statistician, asClosedConnection(db));
  return { open, closed };
}
let meetingId: number;
let look2Id: number;

beforeAll(async () => {
  await resetDatabase();
  await seedDemo();
  trial = (await fetchTrialByCode("CRN-201"))!;
  coordinator = toPublicUser((await fetchUserByEmail("coordinator@cairn.example"))!);
  statistician = toPublicUser((await fetchUserByEmail("statistician@cairn.example"))!);
  const look2 = await db("analyses").where({ trial_id: trial.id, look_number: 2 }).first();
  look2Id = look2.id;
  const invitees = await db("users").whereIn("email", ["dmc@cairn.example", "statistician@cairn.example"]).pluck("id");
  meetingId = await db.transaction((tx) =>
    insertMeeting(tx, {
      trialId: trial.id,
      analysisId: look2Id,
      scheduledAt: new Date("2026-10-20T13:00:00Z"),
      timeZone: "Europe/Oslo",
      openAgenda: "1. Accrual and timeliness <b>not bold</b>",
      closedAgenda: "2. Closed review of look 2",
      reminderDaysBefore: 3,
      createdBy: coordinator.id,
      attendeeUserIds: invitees,
    }),
  );
}, 120_000);

describe("packet generation", () => {
  it("the open packet alone: generating it writes no closed packet", async () => {
    const look1 = await db("analyses").where({ trial_id: trial.id, look_number: 1 }).first();
    const m = await db.transaction((tx) =>
      insertMeeting(tx, { trialId: trial.id, analysisId: look1.id, scheduledAt: new Date("2026-08-20T13:00:00Z"), timeZone: "UTC", openAgenda: "", closedAgenda: "", reminderDaysBefore: 2, createdBy: coordinator.id, attendeeUserIds: [] }),
    );
    const r = await generateOpenPacket(trial, m, coordinator);
    expect(r).toMatchObject({ audience: "open", version: 1, created: true });
    expect((await fetchPackets(m, ["open", "closed"])).map((p) => p.audience)).toEqual(["open"]);
  });

  it("makes an open and a closed packet, version 1 each, with hash and engine version", async () => {
    const r = await generateBoth(trial, meetingId);
    expect(r.open).toMatchObject({ audience: "open", version: 1, created: true });
    expect(r.closed).toMatchObject({ audience: "closed", version: 1, created: true });
    const rows = await fetchPackets(meetingId, ["open", "closed"]);
    expect(rows).toHaveLength(2);
    for (const p of rows) {
      expect(p.content_hash).toMatch(/^[0-9a-f]{64}$/);
      expect(p.engine_version).toMatch(/^\d+\.\d+\.\d+$/);
      expect("pdf" in p).toBe(false);
    }
  });

  it("the open PDF has the open report's pages, the caution, and nothing closed", async () => {
    const meta = (await fetchPackets(meetingId, ["open"]))[0];
    const pdf = (await fetchPacketPdf(meta.id))!.pdf;
    expect(pdf.subarray(0, 5).toString()).toBe("%PDF-");
    const text = pdfText(pdf);
    expect(pdfPages(pdf)).toBe(meta.page_count);
    for (const title of ["Open report", "Accrual", "Look schedule", "Data timeliness", "Recommendations recorded so far", "Open session agenda"]) expect(text).toContain(title);
    expect(flat(text)).toContain(flat(CAUTION_TEXT));
    expect(text).toContain("<b>not bold</b>");
    expect(text).toContain("OPEN REPORT - for everyone on the trial");
    for (const closed of ["CLOSED REPORT", "Posterior response rates", "Stopping boundaries", "Prior sensitivity", "Reproducibility record", "Closed review of look 2", "Interim counts"]) expect(text).not.toContain(closed);
    expect(text).toContain(meta.content_hash.slice(0, 16));
  });

  it("the closed PDF has every closed section, on pages after the open report, and the caution", async () => {
    const meta = (await fetchPackets(meetingId, ["closed"]))[0];
    const pdf = (await fetchPacketPdf(meta.id))!.pdf;
    const pages = execFileSync("/usr/bin/pdftotext", ["-layout", "-", "-"], { input: pdf }).toString("utf8").split("\f");
    // Page 1 (the cover) lists every section title; look for each title in the pages after it.
    const pageOf = (s: string) => pages.findIndex((p, i) => i > 0 && p.includes(s));
    for (const title of ["Closed report: closed session agenda", "Interim counts at look 2", "Posterior response rates", "Predictive probability of success", "Stopping boundaries", "Safety", "Prior sensitivity", "The decision under the locked rule", "Reproducibility record"])
      expect(pageOf(title), title).toBeGreaterThan(pageOf("Data timeliness"));
    expect(pages.every((p) => p.trim() === "" || p.includes("CLOSED REPORT"))).toBe(true);
    expect(flat(pages.join(" "))).toContain(flat(CAUTION_TEXT));
  });

  it("regenerating unchanged data keeps the versions; changed counts make a new closed version and the old one stays", async () => {
    const again = await generateBoth(trial, meetingId);
    expect(again.open).toMatchObject({ version: 1, created: false });
    expect(again.closed).toMatchObject({ version: 1, created: false });
    await db("analysis_arm_counts").where({ analysis_id: look2Id }).update({ responders: 7 });
    const changed = await generateBoth(trial, meetingId);
    expect(changed.open).toMatchObject({ version: 1, created: false });
    expect(changed.closed).toMatchObject({ version: 2, created: true });
    const closed = await fetchPackets(meetingId, ["closed"]);
    expect(closed.map((p) => p.version)).toEqual([2, 1]);
    expect(closed[0].content_hash).not.toBe(closed[1].content_hash);
    const old = await fetchPacketPdf(closed[1].id);
    expect(old?.pdf.length).toBeGreaterThan(1000);
    const audit = await db("audit_events").where({ action: "packet_generated" }).select("visibility", "new_values");
    // Two open versions: this meeting's and the look-1 meeting's of the first test.
    expect(audit.map((a: { visibility: string }) => a.visibility).sort()).toEqual(["closed", "closed", "open", "open"]);
  });

  it("skips the closed packet (with the reason) while the reviewed analysis is not locked", async () => {
    const look3 = await db("analyses").where({ trial_id: trial.id, look_number: 3 }).first();
    const m = await db.transaction((tx) =>
      insertMeeting(tx, { trialId: trial.id, analysisId: look3.id, scheduledAt: new Date("2027-01-20T13:00:00Z"), timeZone: "UTC", openAgenda: "", closedAgenda: "", reminderDaysBefore: 2, createdBy: coordinator.id, attendeeUserIds: [] }),
    );
    const r = await generateBoth(trial, m);
    expect(r.open.version).toBe(1);
    expect(r.closed).toEqual({ audience: "closed", skipped: expect.stringContaining("not locked") });
  });
});

describe("two-arm trial", () => {
  it("builds the closed report with both arms and the difference probability (CRN-305, look 1)", async () => {
    const t305 = (await fetchTrialByCode("CRN-305"))!;
    const look1 = await db("analyses").where({ trial_id: t305.id, look_number: 1 }).first();
    const m = await db.transaction((tx) =>
      insertMeeting(tx, { trialId: t305.id, analysisId: look1.id, scheduledAt: new Date("2026-09-20T09:00:00Z"), timeZone: "America/New_York", openAgenda: "", closedAgenda: "", reminderDaysBefore: 1, createdBy: coordinator.id, attendeeUserIds: [] }),
    );
    const r = await generateBoth(t305, m);
    expect(r.closed).toMatchObject({ version: 1, created: true });
    const meta = (await fetchPackets(m, ["closed"]))[0];
    const text = flat(pdfText((await fetchPacketPdf(meta.id))!.pdf));
    expect(text).toContain("TLM-417 + standard care");
    expect(text).toContain("Standard care");
    expect(text).toMatch(/P\(pT - pC > 0\.0% \| data\) \d\.\d{3}/);
    expect(text).toContain("Experimental responders");
  });
});

describe("who may download which packet", () => {
  it("open packets: everyone on the trial; closed packets: unblinded roles only (admin stays blinded)", () => {
    expect(mayDownloadPacket({ isAdmin: false, roles: ["sponsor"] }, "open")).toBe(true);
    expect(mayDownloadPacket({ isAdmin: false, roles: ["sponsor"] }, "closed")).toBe(false);
    expect(mayDownloadPacket({ isAdmin: false, roles: ["coordinator"] }, "closed")).toBe(false);
    expect(mayDownloadPacket({ isAdmin: true, roles: [] }, "closed")).toBe(false);
    expect(mayDownloadPacket({ isAdmin: true, roles: [] }, "open")).toBe(true);
    expect(mayDownloadPacket({ isAdmin: false, roles: ["dmc_member"] }, "closed")).toBe(true);
    expect(mayDownloadPacket({ isAdmin: false, roles: ["unblinded_statistician"] }, "closed")).toBe(true);
  });
});
