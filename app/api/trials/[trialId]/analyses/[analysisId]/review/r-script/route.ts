import { closedConnection, requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { loadReview } from "@/lib/review/load-review";
import { reproductionScript, reproductionScriptFileName } from "@/lib/review/reproduction-script";
import { lookIds, type LookRouteParams } from "@/lib/route-params";

export const dynamic = "force-dynamic";

/** CLOSED: the base-R script that recomputes this look's closed numbers and compares them with Cairn's. */
export const GET = handle(async (_req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "viewClosed");
  const { trial } = access;
  const { input, review, analysis } = await loadReview(trial, analysisId, closedConnection(access));
  const script = reproductionScript({ trialCode: trial.code, input, review, reviewVersion: analysis.review_version });
  return new Response(script, {
    headers: {
      "Content-Type": "text/plain; charset=utf-8",
      "Content-Disposition": `attachment; filename="${reproductionScriptFileName(trial.code, review.lookNumber)}"`,
      "Cache-Control": "no-store",
    },
  });
});
