import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { saveArmCounts } from "@/lib/analyses/service";

export const dynamic = "force-dynamic";

/** Replaces the per-arm counts of an open look. Body: { rowVersion, cutoffDate, counts: [...], reason? }. */
export const PUT = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  // A data-capture export job may call this with a personal API token (README, "Machine clients").
  const access = await requireTrialAccess(trialId, "enterData", { bearer: req });
  return NextResponse.json(await saveArmCounts(access, analysisId, await readJson(req)));
});
