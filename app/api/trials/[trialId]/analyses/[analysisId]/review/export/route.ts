import { closedConnection, requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { loadReproducibilityRecord } from "@/lib/review/load-review";
import { lookIds, type LookRouteParams } from "@/lib/route-params";

export const dynamic = "force-dynamic";

/** CLOSED: the reproducibility record (inputs, engine version, outputs, time) as a JSON download. */
export const GET = handle(async (_req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "viewClosed");
  const { trial } = access;
  const record = await loadReproducibilityRecord(trial, analysisId, closedConnection(access));
  const name = `${trial.code}-look-${record.outputs.lookNumber}-closed-review.json`.replace(/[^A-Za-z0-9._-]/g, "_");
  return new Response(JSON.stringify(record, null, 2), {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Cache-Control": "no-store",
    },
  });
});
