import "server-only";
/**
 * The closed packet of a meeting: the open report followed by the closed report (arm-level
 * results). Reads closed data, so it takes a ClosedConnection, which only lib/auth hands out and
 * only with an unblinded access (closedConnection(access)); nothing blinded imports this module.
 */
import type { PublicUser, TrialRow } from "@/db/types";
import type { ClosedConnection } from "@/db/knex";
import { fetchLookSchedule } from "@/db/queries/open-status";
import { fetchAnalysisLockSigner } from "@/db/queries/packets";
import { fetchDesign } from "@/db/queries/designs";
import { fetchArms } from "@/db/queries/trials";
import { fetchArmCountsForTrial, fetchClosedAgenda } from "@/db/queries/closed";
import { monitoringRuleLabel } from "@/lib/stats/labels";
import { thresholdWord } from "@/lib/design/threshold-labels";
import { StatsDomainError } from "@/lib/stats/validate";
import { computeReview, reproducibilityRecord, type ReviewInput } from "@/lib/review/compute-review";
import { buildClosedPacket } from "./build";
import type { PacketDocument } from "./document";
import { loadOpenPacketInput, type MeetingPacketInput } from "./open-packet";
import { storePacketIfChanged, type GeneratedPacket } from "./store";

export type ClosedPacketResult = GeneratedPacket | { audience: "closed"; skipped: string };

/**
 * The closed packet document, or the reason it cannot be made yet. CLOSED: arm-level counts are
 * read here through the caller's closed connection.
 */
async function buildClosedDocument(trial: TrialRow, open: MeetingPacketInput, closed: ClosedConnection, now: Date): Promise<PacketDocument | string> {
  const lock = await fetchAnalysisLockSigner(open.analysisId);
  const reviewed = open.looks.find((l) => l.lookNumber === open.meeting.lookNumber);
  if (!lock || !reviewed || (reviewed.status !== "locked" && reviewed.status !== "reviewed"))
    return `the analysis for look ${open.meeting.lookNumber} is not locked yet; the closed report is made from locked data only`;
  const design = await fetchDesign(lock.designId);
  if (!design) return "the analysis has no design";
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
        ruleLabel: ruleWords(design.spec.rule, design.spec.arms),
      },
      lock: { signedBy: lock.signerName, lockedAt: lock.lockedAt ? new Date(lock.lockedAt) : null },
    });
  } catch (e) {
    // The engine's message quotes values from closed rows; the caller holds a closed connection,
    // so it is unblinded and may read it.
    if (e instanceof StatsDomainError) return `the closed review cannot be computed from the stored data (${e.message})`;
    throw e;
  }
}


/**
 * Prepares (or confirms unchanged) the closed packet of a meeting, or says why it cannot be made
 * yet (the look is not locked; the stored data do not compute).
 */
export async function prepareClosedPacket(trial: TrialRow, meetingId: number, user: PublicUser, closed: ClosedConnection, now = new Date()): Promise<ClosedPacketResult> {
  const open = await loadOpenPacketInput(trial, meetingId);
  const doc = await buildClosedDocument(trial, open, closed, now);
  if (typeof doc === "string") return { audience: "closed", skipped: doc };
  return storePacketIfChanged(trial, meetingId, doc, user, now);
}

/**
 * The monitoring rule in Cairn's words, the published symbol in brackets after each threshold (the
 * packet's method section may carry the notation), e.g. "Predictive probability (Lee & Liu 2008):
 * final success bar (θT) 0.9; interim futility floor (θL) 0.05; no early-success stopping".
 */
export function ruleWords(rule: { kind: string; thetaT: number; futilityThreshold: number; efficacyStopping: boolean; efficacyThreshold: number | null }, arms: "single" | "two"): string {
  const kind = rule.kind === "predictive" ? "predictive" : "posterior";
  const w = (key: "thetaT" | "futilityThreshold" | "efficacyThreshold") => {
    const t = thresholdWord(key, kind);
    return `${t.word.toLowerCase()} (${t.symbol})`;
  };
  const head = rule.kind === "predictive" ? "Predictive probability (Lee & Liu 2008)" : monitoringRuleLabel(rule.kind as Parameters<typeof monitoringRuleLabel>[0], arms);
  const early = rule.efficacyStopping ? `${w("efficacyThreshold")} ${rule.efficacyThreshold}` : "no early-success stopping";
  return `${head}: ${w("thetaT")} ${rule.thetaT}; ${w("futilityThreshold")} ${rule.futilityThreshold}; ${early}`;
}
