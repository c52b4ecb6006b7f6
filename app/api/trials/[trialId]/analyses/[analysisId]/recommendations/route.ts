import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { fetchRecommendationsClosed } from "@/db/queries/recommendations";
import { recordRecommendation } from "@/lib/review/record-recommendation";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { fetchAnalysisOpen } from "@/db/queries/open-status";
import { notFoundError } from "@/lib/http";

export const dynamic = "force-dynamic";

/** CLOSED: the recommendations of one analysis with rationale and signature (viewClosed). */
export const GET = handle(async (_req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const { trial } = await requireTrialAccess(trialId, "viewClosed");
  const analysis = await fetchAnalysisOpen(analysisId);
  if (!analysis || analysis.trial_id !== trial.id) throw notFoundError("That analysis");
  return NextResponse.json({ recommendations: await fetchRecommendationsClosed(trial.id, analysisId) }, { headers: { "Cache-Control": "no-store" } });
});

/**
 * A DMC member records the committee's recommendation with an e-signature.
 * Body: { decision, rationale, password, correctsId? }. 201 with the new entry.
 */
export const POST = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "recordRecommendation");
  const body = await readJson(req, 32 * 1024);
  const recorded = await recordRecommendation(access, analysisId, body);
  return NextResponse.json(recorded, { status: 201 });
});
