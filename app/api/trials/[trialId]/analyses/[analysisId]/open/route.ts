import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { openLookForEntry } from "@/lib/analyses/service";

export const dynamic = "force-dynamic";

/** Opens a planned look for entry and sets its data cut-off. Body: { rowVersion, cutoffDate }. */
export const POST = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "enterData");
  return NextResponse.json(await openLookForEntry(access, analysisId, await readJson(req)));
});
