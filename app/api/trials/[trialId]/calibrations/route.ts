import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { HttpError, handle, readJson } from "@/lib/http";
import { calibrationBodySchema, expandGrid, maxTwoArmSearchPoints, parseDesignForTrial } from "@/lib/design/api-schemas";
import { startCalibrationJob } from "@/lib/jobs/calibration-jobs";
import { calibrationJobJson } from "@/lib/jobs/calibration-job-json";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ trialId: string }> };

/**
 * Starts a threshold search for a one-arm or two-arm design (202 with the job). Body: { spec,
 * typeIErrorLimit, powerTarget, thetaT: {from,to,step}, thetaL: {...}, thetaU: {...} | null, keep }.
 */
export const POST = handle(async (req: Request, ctx: Ctx) => {
  const { trial, user } = await requireTrialAccess(Number((await ctx.params).trialId), "editDesign");
  const body = calibrationBodySchema.parse(await readJson(req));
  const design = parseDesignForTrial(body.spec, trial.design_type);
  if (body.thetaU && !design.rule.efficacyStopping) throw new HttpError(422, "Switch efficacy stopping on to search efficacy thresholds, or leave that grid empty.", { field: "thetaU" });
  const thetaTGrid = expandGrid(body.thetaT);
  const thetaLGrid = expandGrid(body.thetaL);
  const thetaUGrid = body.thetaU ? expandGrid(body.thetaU) : null;
  if (design.arms === "two") {
    const points = thetaTGrid.length * thetaLGrid.length * (thetaUGrid ? thetaUGrid.length : 1);
    const max = maxTwoArmSearchPoints(design);
    if (points > max)
      throw new HttpError(422, `This two-arm search has ${points} threshold combinations; at this sample size and look schedule at most ${max} finish in about a minute. Use a larger step or a narrower range.`, { field: "thetaL" });
  }
  const job = await startCalibrationJob({
    trialId: trial.id,
    userId: user.id,
    design,
    thetaTGrid,
    thetaLGrid,
    thetaUGrid,
    typeIErrorLimit: body.typeIErrorLimit,
    powerTarget: body.powerTarget,
    keep: body.keep,
  });
  return NextResponse.json({ job: calibrationJobJson(job) }, { status: 202 });
});
