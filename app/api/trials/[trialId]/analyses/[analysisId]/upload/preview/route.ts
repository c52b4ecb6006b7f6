import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { lookIds, type LookRouteParams } from "@/lib/route-params";
import { previewPatientUpload } from "@/lib/analyses/service";
import { readCsvUpload } from "@/lib/analyses/read-upload";

export const dynamic = "force-dynamic";

/**
 * Checks a patient-level CSV (raw text/csv body, at most 5 MB) against the look and answers with
 * the derived counts or the row-by-row problems. Writes nothing.
 */
export const POST = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "enterData", { bearer: req });
  const bytes = await readCsvUpload(req);
  return NextResponse.json(await previewPatientUpload(access, analysisId, bytes));
});
