import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { lockAnalysis } from "@/lib/analyses/service";
import { warmReviewCache } from "@/lib/review/review-cache";

export const dynamic = "force-dynamic";

/** Locks an open look with an e-signature ("analysis locked"). Body: { rowVersion, password }. */
export const POST = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "enterData");
  const locked = await lockAnalysis(access, analysisId, await readJson(req, 16 * 1024));
  // The lock has committed: compute and keep the closed review in the background (worker thread).
  void warmReviewCache(access.trial, analysisId);
  return NextResponse.json(locked);
});
