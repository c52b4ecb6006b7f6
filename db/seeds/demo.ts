import "server-only";
/**
 * The invented demo scenario. Every name here is made up: the sponsor (Tallmoor Therapeutics),
 * the drug code (TLM-417), the trials and the people. Used by `scripts/up` and the browser tests.
 */
import bcrypt from "bcryptjs";
import { db } from "../knex";
import { appendAudit } from "../audit";
import { insertUser } from "../queries/users";
import { insertTrial } from "../queries/trials";
import { insertMembership } from "../queries/memberships";
import { insertDesignVersion, markDesignLocked } from "../queries/designs";
import { insertSignature } from "../queries/signatures";
import { createPlannedLooks } from "../queries/analyses";
import { replaceArmCounts } from "../queries/closed";
import { insertCommitteeMember } from "../queries/committee";
import { insertMeeting } from "../queries/meetings";
import { expandLooks } from "@/lib/stats/looks";
import { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "./demo-designs";

export { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN };
import type { TrialRole } from "../types";

export const DEMO_ACCOUNTS = [
  { key: "admin", name: "Olu Haddad", email: "admin@cairn.example", password: "demo-admin-pass", isAdmin: true },
  { key: "statistician", name: "Ines Okafor-Lind", email: "statistician@cairn.example", password: "demo-stat-pass", isAdmin: false },
  { key: "dmc", name: "Dr Rafael Quintero-Vale", email: "dmc@cairn.example", password: "demo-dmc-pass", isAdmin: false },
  { key: "dmc2", name: "Dr Hanne Sorvik", email: "dmc2@cairn.example", password: "demo-dmc2-pass", isAdmin: false },
  { key: "dmc3", name: "Dr Kwame Ashdown-Ries", email: "dmc3@cairn.example", password: "demo-dmc3-pass", isAdmin: false },
  { key: "sponsor", name: "Mara Vell", email: "sponsor@cairn.example", password: "demo-sponsor-pass", isAdmin: false },
  { key: "coordinator", name: "Tomas Brandt-Oye", email: "coordinator@cairn.example", password: "demo-coord-pass", isAdmin: false },
] as const;


/**
 * The demo interim counts: look by look, per arm (closed data). Treated (evaluable for toxicity)
 * and evaluable for response are separate denominators: every enrolled patient of CRN-201 has
 * started treatment, one per look is not yet evaluable for response.
 */
const DEMO_COUNTS = {
  "CRN-201": [
    { look: 1, cutoff: "2026-06-30", lockedAt: "2026-07-06T10:00:00Z", arms: { single: { enrolled: 11, treated: 11, evaluable: 10, responders: 3, toxicities: 1 } } },
    { look: 2, cutoff: "2026-09-30", lockedAt: "2026-10-05T10:00:00Z", arms: { single: { enrolled: 21, treated: 21, evaluable: 20, responders: 6, toxicities: 3 } } },
  ],
  "CRN-305": [
    {
      look: 1,
      cutoff: "2026-08-31",
      lockedAt: "2026-09-08T10:00:00Z",
      arms: {
        experimental: { enrolled: 21, treated: null, evaluable: 20, responders: 9, toxicities: null },
        control: { enrolled: 22, treated: null, evaluable: 20, responders: 5, toxicities: null },
      },
    },
  ],
} as const;

export async function isDatabaseEmpty(): Promise<boolean> {
  const row = await db("users").count({ n: "*" }).first();
  return Number(row?.n ?? 0) === 0;
}

/** Seeds the demo scenario in one transaction: all or nothing. */
export async function seedDemo(): Promise<void> {
  const hashes = await Promise.all(DEMO_ACCOUNTS.map((a) => bcrypt.hash(a.password, 10)));
  await db.transaction(async (tx) => {
    const ids: Record<string, number> = {};
    for (const [i, a] of DEMO_ACCOUNTS.entries()) {
      ids[a.key] = await insertUser(tx, { email: a.email, name: a.name, passwordHash: hashes[i], isAdmin: a.isAdmin });
      await appendAudit(tx, { actorUserId: null, actorEmail: "demo-seed", trialId: null, action: "account_created", entityType: "user", entityId: ids[a.key], visibility: "open", newValues: { name: a.name, email: a.email, isAdmin: a.isAdmin } });
    }
    const trials = [
      {
        code: "CRN-201",
        title: "TLM-417 in previously treated advanced solid tumours: a single-arm phase II study",
        designType: "single" as const,
        endpointName: "Objective response by week 16",
        toxicityEndpointName: "Grade 3+ treatment-related adverse event",
        targetEnrolment: 44,
        arms: [{ label: "TLM-417 400 mg", armRole: "single" as const }],
        design: SINGLE_ARM_DEMO_DESIGN,
        // First patient 2026-03-02: drafted and approved in the weeks before.
        designDraftedAt: new Date("2026-01-19T09:00:00Z"),
        designLockedAt: new Date("2026-02-09T14:30:00Z"),
        looks: expandLooks(SINGLE_ARM_DEMO_DESIGN.looks, SINGLE_ARM_DEMO_DESIGN.nMax),
      },
      {
        code: "CRN-305",
        title: "TLM-417 plus standard care versus standard care alone: a randomised phase II study",
        designType: "two" as const,
        endpointName: "Clinical response at day 28",
        toxicityEndpointName: null,
        targetEnrolment: 130,
        arms: [
          { label: "TLM-417 + standard care", armRole: "experimental" as const },
          { label: "Standard care", armRole: "control" as const },
        ],
        design: TWO_ARM_DEMO_DESIGN,
        // First patient 2026-04-13.
        designDraftedAt: new Date("2026-02-23T09:00:00Z"),
        designLockedAt: new Date("2026-03-23T11:00:00Z"),
        looks: expandLooks(TWO_ARM_DEMO_DESIGN.looks, TWO_ARM_DEMO_DESIGN.nMaxPerArm),
      },
    ];
    const roles: Array<[string, TrialRole]> = [
      ["statistician", "unblinded_statistician"],
      ["dmc", "dmc_member"],
      ["dmc2", "dmc_member"],
      ["sponsor", "sponsor"],
      ["coordinator", "coordinator"],
    ];
    for (const t of trials) {
      const trialId = await insertTrial(tx, {
        code: t.code,
        title: t.title,
        sponsorName: "Tallmoor Therapeutics (invented)",
        phase: "II",
        designType: t.designType,
        endpointName: t.endpointName,
        toxicityEndpointName: t.toxicityEndpointName,
        targetEnrolment: t.targetEnrolment,
        createdBy: ids.statistician,
        arms: t.arms,
      });
      await appendAudit(tx, { actorUserId: ids.statistician, actorEmail: "demo-seed", trialId, action: "trial_created", entityType: "trial", entityId: trialId, visibility: "open", newValues: { code: t.code, title: t.title } });
      for (const [key, role] of roles) {
        const mid = await insertMembership(tx, { trialId, userId: ids[key], role });
        await appendAudit(tx, { actorUserId: ids.admin, actorEmail: "demo-seed", trialId, action: "role_assigned", entityType: "trial_membership", entityId: mid, visibility: "open", newValues: { userId: ids[key], role } });
      }
      if (t.code === "CRN-305") {
        // The two-arm trial has a committee of three: a third DMC member sits on it only.
        const mid = await insertMembership(tx, { trialId, userId: ids.dmc3, role: "dmc_member" });
        await appendAudit(tx, { actorUserId: ids.admin, actorEmail: "demo-seed", trialId, action: "role_assigned", entityType: "trial_membership", entityId: mid, visibility: "open", newValues: { userId: ids.dmc3, role: "dmc_member" } });
      }
      const design = await insertDesignVersion(tx, { trialId, spec: t.design, createdBy: ids.statistician, amendmentReason: null });
      // The charter's quorum of the two-arm trial's committee: two voting members present.
      if (t.code === "CRN-305") await tx("designs").where({ id: design.id }).update({ dmc_quorum: 2 });
      const sig = await insertSignature(tx, {
        userId: ids.statistician,
        signerName: DEMO_ACCOUNTS[1].name,
        signerEmail: DEMO_ACCOUNTS[1].email,
        meaning: "design approved",
        entityType: "design",
        entityId: design.id,
        record: { trialId, version: design.version, spec: t.design },
        signedAt: t.designLockedAt,
      });
      await markDesignLocked(tx, design.id, sig.id);
      // The story holds together: the design was approved before the first patient, so before any look's data.
      await tx("designs").where({ id: design.id }).update({ created_at: t.designDraftedAt, locked_at: t.designLockedAt });
      await createPlannedLooks(tx, trialId, design.id, t.looks);
      await appendAudit(tx, { actorUserId: ids.statistician, actorEmail: "demo-seed", trialId, action: "design_locked", entityType: "design", entityId: design.id, visibility: "open", newValues: { version: design.version, signatureId: sig.id } });

      const armRows = await tx("arms").where({ trial_id: trialId });
      for (const c of DEMO_COUNTS[t.code as keyof typeof DEMO_COUNTS]) {
        const analysis = await tx("analyses").where({ trial_id: trialId, look_number: c.look }).first();
        const counts = Object.entries(c.arms).map(([role, v]) => ({
          armId: armRows.find((a: { arm_role: string }) => a.arm_role === role).id,
          ...v,
        }));
        await replaceArmCounts(tx, analysis.id, counts);
        const lockSig = await insertSignature(tx, {
          userId: ids.statistician,
          signerName: DEMO_ACCOUNTS[1].name,
          signerEmail: DEMO_ACCOUNTS[1].email,
          meaning: "analysis locked",
          entityType: "analysis",
          entityId: analysis.id,
          record: { analysisId: analysis.id, cutoff: c.cutoff, counts },
          signedAt: new Date(c.lockedAt),
        });
        await tx("analyses")
          .where({ id: analysis.id })
          .update({
            cutoff_date: c.cutoff,
            enrolled_total: counts.reduce((s, x) => s + x.enrolled, 0),
            status: "locked",
            locked_at: new Date(c.lockedAt),
            lock_signature_id: lockSig.id,
          });
        await appendAudit(tx, { actorUserId: ids.statistician, actorEmail: "demo-seed", trialId, action: "counts_entered", entityType: "analysis", entityId: analysis.id, visibility: "closed", newValues: { counts } });
        await appendAudit(tx, { actorUserId: ids.statistician, actorEmail: "demo-seed", trialId, action: "analysis_locked", entityType: "analysis", entityId: analysis.id, visibility: "open", newValues: { cutoff: c.cutoff, status: "locked" } });
      }
      await tx("trials").where({ id: trialId }).update({ status: "active", first_patient_on: t.code === "CRN-201" ? "2026-03-02" : "2026-04-13" });
    }
    // The two-arm trial's DMC: a chair and two voting members, and the independent statistician (non-voting).
    const t2 = await tx("trials").where({ code: "CRN-305" }).first();
    for (const [key, role] of [["dmc", "chair"], ["dmc2", "voting"], ["dmc3", "voting"], ["statistician", "statistician"]] as const) {
      const cid = await insertCommitteeMember(tx, { trialId: t2.id, userId: ids[key], role, createdBy: ids.admin });
      await appendAudit(tx, { actorUserId: ids.admin, actorEmail: "demo-seed", trialId: t2.id, action: "committee_member_added", entityType: "committee_member", entityId: cid, visibility: "open", newValues: { userId: ids[key], role } });
    }
    // The committee met on look 1 of CRN-305 (a past date: the meeting is ready for attendance,
    // declarations, votes and minutes, none of which the seed records).
    const t2look1 = await tx("analyses").where({ trial_id: t2.id, look_number: 1 }).first();
    const t2meeting = await insertMeeting(tx, {
      trialId: t2.id,
      analysisId: t2look1.id,
      scheduledAt: new Date("2026-09-15T12:00:00Z"),
      timeZone: "Europe/Oslo",
      openAgenda: "1. Accrual and data timeliness\n2. Questions from the sponsor",
      closedAgenda: "3. Closed results of look 1\n4. The committee's vote",
      reminderDaysBefore: 3,
      createdBy: ids.coordinator,
      attendeeUserIds: [ids.dmc, ids.dmc2, ids.dmc3, ids.statistician, ids.sponsor, ids.coordinator],
    });
    await appendAudit(tx, { actorUserId: ids.coordinator, actorEmail: "demo-seed", trialId: t2.id, action: "meeting_scheduled", entityType: "meeting", entityId: t2meeting, visibility: "open", newValues: { lookNumber: 1, scheduledAt: "2026-09-15T12:00:00.000Z", timeZone: "Europe/Oslo" } });
    // The first look of the single-arm trial has been reviewed and a recommendation recorded.
    const t1 = await tx("trials").where({ code: "CRN-201" }).first();
    const look1 = await tx("analyses").where({ trial_id: t1.id, look_number: 1 }).first();
    const rationale = "Predictive probability well above the futility threshold; no safety signal at this look. Continue to the next planned look.";
    const record = { analysisId: look1.id, decision: "continue", rationale, correctsId: null };
    const recSig = await insertSignature(tx, {
      userId: ids.dmc,
      signerName: DEMO_ACCOUNTS[2].name,
      signerEmail: DEMO_ACCOUNTS[2].email,
      meaning: "recommendation recorded",
      entityType: "analysis",
      entityId: look1.id,
      record,
      signedAt: new Date("2026-07-14T15:00:00Z"),
    });
    const [recId] = await tx("recommendations").insert({ trial_id: t1.id, analysis_id: look1.id, decision: "continue", rationale, signature_id: recSig.id, created_by: ids.dmc, created_at: new Date("2026-07-14T15:00:00Z") });
    await tx("analyses").where({ id: look1.id }).update({ status: "reviewed", reviewed_at: new Date("2026-07-14T15:00:00Z") });
    await appendAudit(tx, { actorUserId: ids.dmc, actorEmail: "demo-seed", trialId: t1.id, action: "recommendation_recorded", entityType: "recommendation", entityId: recId, visibility: "open", newValues: { decision: "continue", analysisId: look1.id } });
  });
}
