import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { HttpError, handle, readJson } from "@/lib/http";
import { fetchArms } from "@/db/queries/trials";
import { parseDesignForTrial, specBodySchema } from "@/lib/design/api-schemas";
import { cachedDesignPreview } from "@/lib/design/preview-cache";
import { PREVIEW_MAX_PER_ARM } from "@/lib/design/preview";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ trialId: string }> };

/**
 * Boundaries and exact operating characteristics of a candidate design ({ spec }). Reads no trial
 * data (only the design typed in and the arm labels), so everyone who may see the trial may ask.
 */
export const POST = handle(async (req: Request, ctx: Ctx) => {
  const { trial } = await requireTrialAccess(Number((await ctx.params).trialId), "viewOpen");
  const design = parseDesignForTrial(specBodySchema.parse(await readJson(req)).spec, trial.design_type);
  if (design.arms === "two" && design.nMaxPerArm > PREVIEW_MAX_PER_ARM)
    throw new HttpError(422, `The live preview handles up to ${PREVIEW_MAX_PER_ARM} patients per arm; the design may still be saved.`, { field: "nMaxPerArm" });
  const arms = await fetchArms(trial.id);
  const label = (role: string) => arms.find((a) => a.arm_role === role)?.label;
  const started = performance.now();
  const preview = await cachedDesignPreview(design, { arm: label("single"), experimental: label("experimental"), control: label("control") });
  return NextResponse.json({ preview, computeMs: Math.round(performance.now() - started) });
});
