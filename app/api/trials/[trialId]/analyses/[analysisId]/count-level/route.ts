import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { switchToCountLevel } from "@/lib/analyses/service";

export const dynamic = "force-dynamic";

/**
 * Switches a patient-level look to count-level entry: its patient rows are removed so its counts
 * can be typed in. Body: { rowVersion, reason }. Recorded in the audit trail (closed).
 */
export const POST = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "enterData");
  return NextResponse.json(await switchToCountLevel(access, analysisId, await readJson(req, 16 * 1024)));
});
