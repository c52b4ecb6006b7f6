import "server-only";
/**
 * Generates a meeting's packets and stores each as a new version when its content changed. The
 * closed part is computed on the server from arm-level counts and stored; who may download it is
 * decided by the download route (unblinded roles only). A blinded organiser can trigger the
 * generation but gets back only version numbers, never closed content or its hash.
 */
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import type { PacketAudience, PublicUser, TrialRow } from "@/db/types";
import { fetchAttendees, fetchMeeting } from "@/db/queries/meetings";
import { fetchLookSchedule, fetchRecommendationsOpen } from "@/db/queries/open-status";
import { fetchAnalysisLockSigner, fetchLatestPacket, insertPacketVersion, lockMeetingRow } from "@/db/queries/packets";
import { fetchDesign } from "@/db/queries/designs";
import { fetchArms } from "@/db/queries/trials";
import { fetchArmCountsForTrial, fetchClosedAgenda } from "@/db/queries/closed";
import { asClosedConnection } from "@/db/knex";
import { CAUTION_TEXT } from "@/components/caution";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { ENGINE_VERSION } from "@/lib/stats/version";
import { monitoringRuleLabel } from "@/lib/stats/labels";
import { StatsDomainError } from "@/lib/stats/validate";
import { computeReview, reproducibilityRecord, type ReviewInput } from "@/lib/review/compute-review";
import { HttpError } from "@/lib/http";
import { buildClosedPacket, buildOpenPacket } from "./build";
import { packetContentHash, type PacketDocument } from "./document";
import type { OpenPacketInput } from "./open-content";
import { renderPacketPdf } from "./render-pdf";

export type GeneratedPacket = { audience: PacketAudience; packetId: number; version: number; created: boolean };
export type GenerationResult = { open: GeneratedPacket; closed: GeneratedPacket | { audience: "closed"; skipped: string } };

/** Everything the open part needs, read with open queries only. */
export async function loadOpenPacketInput(trial: TrialRow, meetingId: number): Promise<OpenPacketInput & { analysisId: number; meetingId: number }> {
  const meeting = await fetchMeeting(trial.id, meetingId);
  if (!meeting) throw new HttpError(404, "That meeting was not found.");
  const [looks, recommendations, attendees] = await Promise.all([fetchLookSchedule(trial.id), fetchRecommendationsOpen(trial.id), fetchAttendees(meetingId)]);
  return {
    analysisId: meeting.analysis_id,
    meetingId: meeting.id,
    trial: {
      code: trial.code,
      title: trial.title,
      sponsorName: trial.sponsor_name,
      phase: trial.phase,
      designType: trial.design_type,
      endpointName: trial.endpoint_name,
      targetEnrolment: trial.target_enrolment,
      firstPatientOn: trial.first_patient_on,
    },
    meeting: {
      scheduledAt: new Date(meeting.scheduled_at),
      timeZone: meeting.time_zone,
      openAgenda: meeting.open_agenda,
      lookNumber: meeting.lookNumber,
      attendees: attendees.map((a) => ({ name: a.name, roles: a.roles.map((r) => ROLE_LABELS[r]) })),
    },
    looks: looks.map((l) => ({ lookNumber: l.look_number, plannedN: l.planned_n, cutoffDate: l.cutoff_date, enrolledTotal: l.enrolled_total, status: l.status, lockedAt: l.locked_at ? new Date(l.locked_at) : null })),
    recommendations: recommendations.map((r) => ({ lookNumber: r.lookNumber, decision: r.decision, recordedAt: new Date(r.recordedAt), signerName: r.signerName, correctsId: r.correctsId, superseded: r.superseded })),
    caution: CAUTION_TEXT,
  };
}

/**
 * The closed packet document, or the reason it cannot be made yet. CLOSED: arm-level counts are
 * read here; callers must not pass the document (or its hash) to a blinded user.
 */
async function buildClosedDocument(trial: TrialRow, open: Awaited<ReturnType<typeof loadOpenPacketInput>>, now: Date, unblinded: boolean): Promise<PacketDocument | string> {
  const lock = await fetchAnalysisLockSigner(open.analysisId);
  const reviewed = open.looks.find((l) => l.lookNumber === open.meeting.lookNumber);
  if (!lock || !reviewed || (reviewed.status !== "locked" && reviewed.status !== "reviewed"))
    return `the analysis for look ${open.meeting.lookNumber} is not locked yet; the closed report is made from locked data only`;
  const design = await fetchDesign(lock.designId);
  if (!design) return "the analysis has no design";
  // The closed report is built by the server for the meeting, whoever asked for it; nothing
  // built here is returned to the caller (only version numbers), so this is the one place outside
  // lib/auth that takes a closed connection (allow-listed in the blinding-database test).
  const closed = asClosedConnection();
  const [arms, counts, schedule, closedAgenda] = await Promise.all([fetchArms(trial.id), fetchArmCountsForTrial(trial.id, closed), fetchLookSchedule(trial.id), fetchClosedAgenda(open.meetingId, closed)]);
  const lockedLooks = schedule.filter((l) => l.status === "locked" || l.status === "reviewed");
  const input: ReviewInput = {
    design: design.spec,
    arms: arms.map((a) => ({ id: a.id, label: a.label, role: a.arm_role })),
    looks: lockedLooks.map((l) => ({
      analysisId: l.id,
      lookNumber: l.look_number,
      cutoffDate: l.cutoff_date,
      counts: counts
        .filter((c) => c.analysis_id === l.id)
        .map((c) => ({ armId: c.arm_id, enrolled: c.enrolled, treated: c.treated, evaluable: c.evaluable, responders: c.responders, toxicities: c.toxicities })),
    })),
    analysisId: open.analysisId,
    generatedAt: now.toISOString(),
  };
  try {
    const review = computeReview(input);
    return buildClosedPacket(open, {
      review,
      record: reproducibilityRecord(input, review),
      closedAgenda,
      design: {
        id: design.id,
        version: design.version,
        lockedAt: design.locked_at ? new Date(design.locked_at) : null,
        ruleLabel:
          design.spec.rule.kind === "predictive"
            ? `Predictive probability (Lee & Liu 2008): success if P > ${design.spec.rule.thetaT} at the end; futility if PP < ${design.spec.rule.futilityThreshold}${design.spec.rule.efficacyStopping ? `; efficacy if PP > ${design.spec.rule.efficacyThreshold}` : "; no efficacy stopping"}`
            : `${monitoringRuleLabel(design.spec.rule.kind, design.spec.arms)}: futility if P < ${design.spec.rule.futilityThreshold}${design.spec.rule.efficacyStopping ? `; efficacy if P > ${design.spec.rule.efficacyThreshold}` : "; no efficacy stopping"}; success if P > ${design.spec.rule.thetaT} at the end`,
      },
      lock: { signedBy: lock.signerName, lockedAt: lock.lockedAt ? new Date(lock.lockedAt) : null },
    });
  } catch (e) {
    // The engine's message quotes values from closed rows: only an unblinded caller reads it.
    if (e instanceof StatsDomainError) return unblinded ? `the closed review cannot be computed from the stored data (${e.message})` : "the closed review cannot be computed from the stored data; an unblinded statistician can see why on the review screen";
    throw e;
  }
}

async function storeIfChanged(trial: TrialRow, meetingId: number, doc: PacketDocument, user: PublicUser, now: Date): Promise<GeneratedPacket> {
  const contentHash = packetContentHash(doc, ENGINE_VERSION);
  const latest = await fetchLatestPacket(meetingId, doc.audience);
  if (latest && latest.content_hash === contentHash && latest.engine_version === ENGINE_VERSION)
    return { audience: doc.audience, packetId: latest.id, version: latest.version, created: false };
  // Rendering is the slow part: done before the transaction, which then only re-checks and inserts.
  const nextVersion = (latest?.version ?? 0) + 1;
  let rendered = await renderPacketPdf(doc, { version: nextVersion, contentHash, engineVersion: ENGINE_VERSION, generatedAt: now, generatedBy: user.name });
  return writeTransaction(async (tx) => {
    await lockMeetingRow(tx, meetingId);
    const again = await fetchLatestPacket(meetingId, doc.audience, tx);
    if (again && again.content_hash === contentHash && again.engine_version === ENGINE_VERSION)
      return { audience: doc.audience, packetId: again.id, version: again.version, created: false };
    if ((again?.version ?? 0) + 1 !== nextVersion)
      rendered = await renderPacketPdf(doc, { version: (again?.version ?? 0) + 1, contentHash, engineVersion: ENGINE_VERSION, generatedAt: now, generatedBy: user.name });
    const { id, version } = await insertPacketVersion(tx, { meetingId, audience: doc.audience, contentHash, engineVersion: ENGINE_VERSION, pdf: rendered.pdf, pageCount: rendered.pageCount, createdBy: user.id });
    await appendAudit(tx, {
      actorUserId: user.id,
      actorEmail: user.email,
      trialId: trial.id,
      action: "packet_generated",
      entityType: "packet",
      entityId: id,
      // The hash of a closed packet is derived from closed data (small counts could be guessed from it).
      visibility: doc.audience === "closed" ? "closed" : "open",
      newValues: { meetingId, audience: doc.audience, version, contentHash, engineVersion: ENGINE_VERSION, pages: rendered.pageCount },
    });
    return { audience: doc.audience, packetId: id, version, created: true };
  });
}

/**
 * Generates (or confirms unchanged) the open and closed packets of a meeting. `unblinded`: whether
 * the caller may read closed values; a blinded caller (the default) gets no engine message.
 */
export async function generateMeetingPackets(trial: TrialRow, meetingId: number, user: PublicUser, now = new Date(), opts: { unblinded?: boolean } = {}): Promise<GenerationResult> {
  const open = await loadOpenPacketInput(trial, meetingId);
  const openResult = await storeIfChanged(trial, meetingId, buildOpenPacket(open), user, now);
  const closedDoc = await buildClosedDocument(trial, open, now, opts.unblinded === true);
  if (typeof closedDoc === "string") return { open: openResult, closed: { audience: "closed", skipped: closedDoc } };
  return { open: openResult, closed: await storeIfChanged(trial, meetingId, closedDoc, user, now) };
}
