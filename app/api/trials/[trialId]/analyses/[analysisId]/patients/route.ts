import { NextResponse } from "next/server";
import { allows, closedConnection, requireTrialAccess } from "@/lib/auth";
import { forbiddenError, handle } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { loadLookContext } from "@/lib/analyses/service";
import { fetchPatientOutcomeGrid } from "@/db/queries/closed";
import { patientJson } from "@/lib/analyses/json";

export const dynamic = "force-dynamic";

/** CLOSED: the patient-level rows of a look (unblinded roles only). */
export const GET = handle(async (_req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "viewOpen");
  if (!allows(access.principal, "viewClosed") && !allows(access.principal, "enterData")) throw forbiddenError("viewing closed (unblinded) results");
  await loadLookContext(trialId, analysisId);
  const rows = await fetchPatientOutcomeGrid(analysisId, closedConnection(access));
  return NextResponse.json({ patients: rows.map(patientJson) });
});
