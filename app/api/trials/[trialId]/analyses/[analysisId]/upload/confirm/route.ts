import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { confirmPatientUpload } from "@/lib/analyses/service";
import { readCsvUpload } from "@/lib/analyses/read-upload";
import { uploadConfirmQuerySchema } from "@/lib/analyses/schemas";

export const dynamic = "force-dynamic";

/**
 * Writes a patient-level CSV: the same checks as the preview run again, then all rows and the
 * derived counts are written in one transaction, or nothing. Query: ?rowVersion=N&fileName=...
 */
export const POST = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "enterData", { bearer: req });
  const q = uploadConfirmQuerySchema.parse(Object.fromEntries(new URL(req.url).searchParams));
  const bytes = await readCsvUpload(req);
  return NextResponse.json(await confirmPatientUpload(access, analysisId, bytes, q));
});
