import { NextResponse } from "next/server";
import { closedConnection, requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { loadReview } from "@/lib/review/load-review";
import { analysisRouteIds, type AnalysisRouteContext } from "@/lib/review/route-ids";

export const dynamic = "force-dynamic";

/** CLOSED: the whole computed review of a locked analysis, unrounded. DMC members and the unblinded statistician only. */
export const GET = handle(async (_req: Request, ctx: AnalysisRouteContext) => {
  const { trialId, analysisId } = await analysisRouteIds(ctx);
  const access = await requireTrialAccess(trialId, "viewClosed");
  const { trial } = access;
  const { review } = await loadReview(trial, analysisId, closedConnection(access));
  return NextResponse.json(review, { headers: { "Cache-Control": "no-store" } });
});
