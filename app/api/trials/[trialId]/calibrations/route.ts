import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { HttpError, handle, readJson } from "@/lib/http";
import { calibrationBodySchema, expandGrid, parseDesignForTrial } from "@/lib/design/api-schemas";
import { startCalibrationJob } from "@/lib/jobs/calibration-jobs";
import { calibrationJobJson } from "@/lib/jobs/calibration-job-json";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ trialId: string }> };

/**
 * Starts a threshold search for a single-arm design (202 with the job). Body: { spec,
 * typeIErrorLimit, powerTarget, thetaT: {from,to,step}, thetaL: {...}, thetaU: {...} | null, keep }.
 */
export const POST = handle(async (req: Request, ctx: Ctx) => {
  const { trial, user } = await requireTrialAccess(Number((await ctx.params).trialId), "editDesign");
  const body = calibrationBodySchema.parse(await readJson(req));
  const design = parseDesignForTrial(body.spec, trial.design_type);
  if (design.arms !== "single") throw new HttpError(422, "Calibration searches single-arm designs only; for two arms, adjust the thresholds and read the live operating characteristics.");
  if (body.thetaU && !design.rule.efficacyStopping) throw new HttpError(422, "Switch efficacy stopping on to search efficacy thresholds, or leave that grid empty.", { field: "thetaU" });
  const job = await startCalibrationJob({
    trialId: trial.id,
    userId: user.id,
    design,
    thetaTGrid: expandGrid(body.thetaT),
    thetaLGrid: expandGrid(body.thetaL),
    thetaUGrid: body.thetaU ? expandGrid(body.thetaU) : null,
    typeIErrorLimit: body.typeIErrorLimit,
    powerTarget: body.powerTarget,
    keep: body.keep,
  });
  return NextResponse.json({ job: calibrationJobJson(job) }, { status: 202 });
});
