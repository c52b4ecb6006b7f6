/**
 * The authorization matrix's own fixture, independent of the demo seed: an account on no trial (the
 * "outsider" column) and a single-arm trial "MTX-<n>" with numbers unlike the demo's, one locked look
 * with counts, a recorded recommendation, a meeting and its two packets (open and closed). Prints
 * the ids of the fixture and of the two demo trials as one line of JSON.
 *
 * Its closed numbers are chosen to be distinctive (FIXTURE_CLOSED below): if a blinded body
 * contains one of them, the leak is real, not a coincidence with the demo scenario.
 *
 * Run by tests/e2e/blinding-matrix.spec.ts as
 *   CAIRN_DB_NAME=<e2e db> npx tsx --conditions=react-server tests/e2e/support/matrix-fixture.ts
 * Creating it again makes a new trial (a new code); the outsider account is created once.
 */
import bcrypt from "bcryptjs";
import { db } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { fetchUserByEmail, fetchUserById, insertUser, toPublicUser } from "@/db/queries/users";
import { fetchTrial, insertTrial } from "@/db/queries/trials";
import { insertMembership } from "@/db/queries/memberships";
import { insertDesignVersion, markDesignLocked } from "@/db/queries/designs";
import { insertSignature } from "@/db/queries/signatures";
import { createPlannedLooks } from "@/db/queries/analyses";
import { replaceArmCounts } from "@/db/queries/closed";
import { insertMeeting } from "@/db/queries/meetings";
import { generateOpenPacket } from "@/lib/packets/open-packet";
import { prepareClosedPacket } from "@/lib/packets/closed-packet";
import { asClosedConnection } from "@/db/knex";
import { expandLooks } from "@/lib/stats/looks";
import type { SingleArmDesign } from "@/lib/stats/types";
import type { TrialRole } from "@/db/types";
import { FIXTURE_CLOSED, OUTSIDER } from "./matrix-fixture-data";

const DESIGN: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.5, b: 0.5 },
  p0: 0.35,
  p1: 0.55,
  delta: 0,
  nMax: 60,
  looks: { kind: "list", sizes: [43, 60] },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: { qmax: 0.3, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.9 },
};

type TrialIds = { trial: number; analysis: number; arm: number; design: number; meeting?: number; packetOpen?: number; packetClosed?: number };

async function demoIds(code: string, look: number): Promise<TrialIds> {
  const t = await db("trials").where({ code }).first();
  if (!t) throw new Error(`demo trial ${code} is missing: seed the database first (prepare-test-db NAME --seed)`);
  const a = await db("analyses").where({ trial_id: t.id, look_number: look }).first();
  const arm = await db("arms").where({ trial_id: t.id }).orderBy("id").first();
  const d = await db("designs").where({ trial_id: t.id }).orderBy("version", "desc").first();
  return { trial: t.id, analysis: a.id, arm: arm.id, design: d.id };
}

async function main() {
  const user = async (email: string) => {
    const u = await fetchUserByEmail(email);
    if (!u) throw new Error(`account ${email} is missing: seed the database first`);
    return u;
  };
  const stat = await user("statistician@cairn.example");
  const admin = await user("admin@cairn.example");
  const members: Array<[string, TrialRole]> = [
    ["statistician@cairn.example", "unblinded_statistician"],
    ["dmc@cairn.example", "dmc_member"],
    ["sponsor@cairn.example", "sponsor"],
    ["coordinator@cairn.example", "coordinator"],
  ];
  const code = `MTX-${Date.now() % 1_000_000}`;
  const { trialId, analysisId, armId, designId, meetingId } = await db.transaction(async (tx) => {
    if (!(await fetchUserByEmail(OUTSIDER.email, tx))) {
      const id = await insertUser(tx, { email: OUTSIDER.email, name: OUTSIDER.name, passwordHash: await bcrypt.hash(OUTSIDER.password, 10), isAdmin: false });
      await appendAudit(tx, { actorUserId: null, actorEmail: "matrix-fixture", trialId: null, action: "account_created", entityType: "user", entityId: id, visibility: "open", newValues: { name: OUTSIDER.name, email: OUTSIDER.email, isAdmin: false } });
    }
    const trialId = await insertTrial(tx, {
      code,
      title: "Matrix fixture: invented single-arm study for authorization tests",
      sponsorName: "Fixture sponsor (invented)",
      phase: "II",
      designType: "single",
      endpointName: "Fixture response",
      toxicityEndpointName: "Fixture toxicity",
      targetEnrolment: 60,
      createdBy: stat.id,
      arms: [{ label: "Fixture arm", armRole: "single" }],
    });
    await appendAudit(tx, { actorUserId: stat.id, actorEmail: "matrix-fixture", trialId, action: "trial_created", entityType: "trial", entityId: trialId, visibility: "open", newValues: { code } });
    for (const [email, role] of members) {
      const u = await fetchUserByEmail(email, tx);
      const mid = await insertMembership(tx, { trialId, userId: u!.id, role });
      await appendAudit(tx, { actorUserId: admin.id, actorEmail: "matrix-fixture", trialId, action: "role_assigned", entityType: "trial_membership", entityId: mid, visibility: "open", newValues: { userId: u!.id, role } });
    }
    const design = await insertDesignVersion(tx, { trialId, spec: DESIGN, createdBy: stat.id, amendmentReason: null });
    const sig = await insertSignature(tx, { userId: stat.id, signerName: stat.name, signerEmail: stat.email, meaning: "design approved", entityType: "design", entityId: design.id, record: { trialId, version: design.version, spec: DESIGN } });
    await markDesignLocked(tx, design.id, sig.id);
    await createPlannedLooks(tx, trialId, design.id, expandLooks(DESIGN.looks, DESIGN.nMax));
    await appendAudit(tx, { actorUserId: stat.id, actorEmail: "matrix-fixture", trialId, action: "design_locked", entityType: "design", entityId: design.id, visibility: "open", newValues: { version: design.version, signatureId: sig.id } });

    const arm = await tx("arms").where({ trial_id: trialId }).first();
    const analysis = await tx("analyses").where({ trial_id: trialId, look_number: 1 }).first();
    const counts = [{ armId: arm.id, enrolled: FIXTURE_CLOSED.enrolled, treated: FIXTURE_CLOSED.enrolled, evaluable: FIXTURE_CLOSED.evaluable, responders: FIXTURE_CLOSED.responders, toxicities: FIXTURE_CLOSED.toxicities }];
    await replaceArmCounts(tx, analysis.id, counts);
    const lockSig = await insertSignature(tx, { userId: stat.id, signerName: stat.name, signerEmail: stat.email, meaning: "analysis locked", entityType: "analysis", entityId: analysis.id, record: { analysisId: analysis.id, cutoff: "2026-10-15", counts } });
    await tx("analyses").where({ id: analysis.id }).update({ cutoff_date: "2026-10-15", enrolled_total: FIXTURE_CLOSED.enrolled, status: "locked", locked_at: new Date("2026-10-20T09:00:00Z"), lock_signature_id: lockSig.id });
    await appendAudit(tx, { actorUserId: stat.id, actorEmail: "matrix-fixture", trialId, action: "counts_entered", entityType: "analysis", entityId: analysis.id, visibility: "closed", newValues: { counts } });
    await appendAudit(tx, { actorUserId: stat.id, actorEmail: "matrix-fixture", trialId, action: "analysis_locked", entityType: "analysis", entityId: analysis.id, visibility: "open", newValues: { cutoff: "2026-10-15", status: "locked" } });
    await tx("trials").where({ id: trialId }).update({ status: "active", first_patient_on: "2026-05-04" });

    const dmc = await fetchUserByEmail("dmc@cairn.example", tx);
    const record = { analysisId: analysis.id, decision: "continue", rationale: FIXTURE_CLOSED.rationale, correctsId: null };
    const recSig = await insertSignature(tx, { userId: dmc!.id, signerName: dmc!.name, signerEmail: dmc!.email, meaning: "recommendation recorded", entityType: "analysis", entityId: analysis.id, record });
    const [recId] = await tx("recommendations").insert({ trial_id: trialId, analysis_id: analysis.id, decision: "continue", rationale: FIXTURE_CLOSED.rationale, signature_id: recSig.id, created_by: dmc!.id, created_at: new Date("2026-10-27T14:00:00Z") });
    await appendAudit(tx, { actorUserId: dmc!.id, actorEmail: "matrix-fixture", trialId, action: "recommendation_recorded", entityType: "recommendation", entityId: recId, visibility: "open", newValues: { decision: "continue", analysisId: analysis.id } });

    const meetingId = await insertMeeting(tx, {
      trialId,
      analysisId: analysis.id,
      scheduledAt: new Date(Date.now() + 30 * 86_400_000),
      timeZone: "UTC",
      openAgenda: "Fixture open session agenda",
      closedAgenda: "Fixture closed session agenda",
      reminderDaysBefore: 2,
      createdBy: stat.id,
      attendeeUserIds: [dmc!.id],
    });
    await appendAudit(tx, { actorUserId: stat.id, actorEmail: "matrix-fixture", trialId, action: "meeting_scheduled", entityType: "meeting", entityId: meetingId, visibility: "open", newValues: { lookNumber: 1 } });
    return { trialId, analysisId: analysis.id, armId: arm.id, designId: design.id, meetingId };
  });
  const trial = await fetchTrial(trialId);
  const statUser = await fetchUserById(stat.id);
  // The fixture acts as the unblinded statistician would from the closed review.
  await generateOpenPacket(trial!, meetingId, toPublicUser(statUser!));
  await prepareClosedPacket(trial!, meetingId, toPublicUser(statUser!), asClosedConnection(db));
  const packets = await db("packets").where({ meeting_id: meetingId }).select("id", "audience");
  const fixture: TrialIds = {
    trial: trialId,
    analysis: analysisId,
    arm: armId,
    design: designId,
    meeting: meetingId,
    packetOpen: packets.find((p: { audience: string }) => p.audience === "open")?.id,
    packetClosed: packets.find((p: { audience: string }) => p.audience === "closed")?.id,
  };
  const out = { code, single: await demoIds("CRN-201", 2), two: await demoIds("CRN-305", 1), fixture };
  process.stdout.write(JSON.stringify(out) + "\n");
}

try {
  await main();
} finally {
  await db.destroy();
}
