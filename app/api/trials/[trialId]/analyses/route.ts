import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { fetchAnalysesOpen } from "@/db/queries/analyses";
import { idFrom } from "@/lib/route-params";
import { lookJson } from "@/lib/analyses/json";

export const dynamic = "force-dynamic";

/** The looks of a trial with their open fields (status, cut-off, pooled enrolment): no arm-level data. */
export const GET = handle(async (req: Request, ctx: { params: Promise<{ trialId: string }> }) => {
  const trialId = idFrom((await ctx.params).trialId, "That trial");
  const { trial } = await requireTrialAccess(trialId, "viewOpen", { bearer: req });
  const looks = await fetchAnalysesOpen(trial.id);
  return NextResponse.json({ analyses: looks.map(lookJson) });
});
