import { NextResponse } from "next/server";
import { allows, closedConnection, requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { loadLookContext } from "@/lib/analyses/service";
import { lookJson } from "@/lib/analyses/json";
import { armCountsOf, fetchArmCounts, countPatientOutcomes } from "@/db/queries/closed";

export const dynamic = "force-dynamic";

/**
 * One look. Everyone on the trial gets its open fields; arm-level counts are selected only for
 * roles that may see closed data (viewClosed) or enter it (enterData).
 */
export const GET = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "viewOpen", { bearer: req });
  const look = await loadLookContext(trialId, analysisId);
  const body: Record<string, unknown> = {
    analysis: lookJson(look.analysis),
    arms: look.arms.map((a) => ({ id: a.id, label: a.label, role: a.arm_role })),
    safetyRule: look.safetyRule,
  };
  if (allows(access.principal, "viewClosed") || allows(access.principal, "enterData")) {
    const [counts, patientRows] = await Promise.all([fetchArmCounts(analysisId, closedConnection(access)), countPatientOutcomes(analysisId, closedConnection(access))]);
    body.counts = counts.map(armCountsOf);
    body.patientRows = patientRows;
    // patient: counts derived from the patient rows; count: typed in (no patient rows).
    body.dataLevel = patientRows > 0 ? "patient" : "count";
  }
  return NextResponse.json(body);
});
