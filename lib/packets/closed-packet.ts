import "server-only";
/**
 * The closed packet of a meeting: the open report followed by the closed report (arm-level
 * results). Reads closed data, so it takes a ClosedConnection, which only lib/auth hands out and
 * only with an unblinded access (closedConnection(access)); nothing blinded imports this module.
 */
import type { PublicUser, TrialRow } from "@/db/types";
import type { ClosedConnection } from "@/db/knex";
import { fetchAnalysisLockSigner } from "@/db/queries/packets";
import { fetchClosedAgenda } from "@/db/queries/closed";
import { loadReviewInput } from "@/lib/review/load-review";
import { monitoringRuleLabel } from "@/lib/stats/labels";
import { thresholdWord } from "@/lib/design/threshold-labels";
import { StatsDomainError } from "@/lib/stats/validate";
import { computeReview, reproducibilityRecord } from "@/lib/review/compute-review";
import { buildClosedPacket } from "./build";
import type { PacketDocument } from "./document";
import { loadOpenPacketInput, type MeetingPacketInput } from "./open-packet";
import { storePacketIfChanged, type GeneratedPacket } from "./store";

type ClosedPacketResult = GeneratedPacket | { audience: "closed"; skipped: string };

/**
 * The closed packet document, or the reason it cannot be made yet. CLOSED: arm-level counts are
 * read here through the caller's closed connection.
 */
async function buildClosedDocument(trial: TrialRow, open: MeetingPacketInput, closed: ClosedConnection, now: Date): Promise<PacketDocument | string> {
  const lock = await fetchAnalysisLockSigner(open.analysisId);
  const reviewed = open.looks.find((l) => l.lookNumber === open.meeting.lookNumber);
  if (!lock || !reviewed || (reviewed.status !== "locked" && reviewed.status !== "reviewed"))
    return `the analysis for look ${open.meeting.lookNumber} is not locked yet; the closed report is made from locked data only`;
  // The same review input the closed review screen reads (locked looks up to this one, planned
  // sizes, pending counts), so the packet can never show a different computation.
  const [{ input, designVersion }, closedAgenda] = await Promise.all([loadReviewInput(trial, open.analysisId, closed, now), fetchClosedAgenda(open.meetingId, closed)]);
  const spec = input.design;
  try {
    const review = computeReview(input);
    return buildClosedPacket(open, {
      review,
      record: reproducibilityRecord(input, review),
      closedAgenda,
      design: {
        id: designVersion.id,
        version: designVersion.version,
        lockedAt: designVersion.lockedAt ? new Date(designVersion.lockedAt) : null,
        ruleLabel: ruleWords(spec.rule, spec.arms),
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
function ruleWords(rule: { kind: string; thetaT: number; futilityThreshold: number; efficacyStopping: boolean; efficacyThreshold: number | null }, arms: "single" | "two"): string {
  const kind = rule.kind === "predictive" ? "predictive" : "posterior";
  const w = (key: "thetaT" | "futilityThreshold" | "efficacyThreshold") => {
    const t = thresholdWord(key, kind);
    return `${t.word.toLowerCase()} (${t.symbol})`;
  };
  const head = rule.kind === "predictive" ? "Predictive probability (Lee & Liu 2008)" : monitoringRuleLabel(rule.kind as Parameters<typeof monitoringRuleLabel>[0], arms);
  const early = rule.efficacyStopping ? `${w("efficacyThreshold")} ${rule.efficacyThreshold}` : "no early-success stopping";
  return `${head}: ${w("thetaT")} ${rule.thetaT}; ${w("futilityThreshold")} ${rule.futilityThreshold}; ${early}`;
}
