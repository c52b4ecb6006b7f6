import { NextResponse } from "next/server";
import { closedConnection, requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { loadReview } from "@/lib/review/load-review";
import { lookIds, type LookRouteParams } from "@/lib/route-params";

export const dynamic = "force-dynamic";

/** CLOSED: the whole computed review of a locked analysis, unrounded. DMC members and the unblinded statistician only. */
export const GET = handle(async (_req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "viewClosed");
  const { trial } = access;
  const { review } = await loadReview(trial, analysisId, closedConnection(access));
  return NextResponse.json(review, { headers: { "Cache-Control": "no-store" } });
});
