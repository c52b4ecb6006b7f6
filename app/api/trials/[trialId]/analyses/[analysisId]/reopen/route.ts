import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { reopenAnalysis } from "@/lib/analyses/service";

export const dynamic = "force-dynamic";

/** Reopens a locked look as an amendment. Body: { rowVersion, reason }. */
export const POST = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "enterData");
  return NextResponse.json(await reopenAnalysis(access, analysisId, await readJson(req, 16 * 1024)));
});
