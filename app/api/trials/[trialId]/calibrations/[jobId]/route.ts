import { idFrom } from "@/lib/route-params";
import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, notFoundError } from "@/lib/http";
import { cancelCalibrationJob, getCalibrationJob } from "@/lib/jobs/calibration-jobs";
import { calibrationJobJson } from "@/lib/jobs/calibration-job-json";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ trialId: string; jobId: string }> };

/** Progress and (so far) best designs of a search. */
export const GET = handle(async (_req: Request, ctx: Ctx) => {
  const p = await ctx.params;
  const { trial } = await requireTrialAccess(idFrom(p.trialId, "That trial"), "editDesign");
  const job = await getCalibrationJob(trial.id, p.jobId);
  if (!job) throw notFoundError("That calibration");
  return NextResponse.json({ job: calibrationJobJson(job) });
});

/** Cancels a running search; it stops at the next chunk and keeps what it found. */
export const DELETE = handle(async (_req: Request, ctx: Ctx) => {
  const p = await ctx.params;
  const { trial } = await requireTrialAccess(idFrom(p.trialId, "That trial"), "editDesign");
  const job = await cancelCalibrationJob(trial.id, p.jobId);
  if (!job) throw notFoundError("That calibration");
  return NextResponse.json({ job: calibrationJobJson(job) });
});
