import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { fetchDesignVersions } from "@/db/queries/designs";
import { specBodySchema } from "@/lib/design/api-schemas";
import { createDraftDesign } from "@/lib/design/service";
import { designVersionJson } from "@/lib/design/serialize";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ trialId: string }> };

/** Every design version of the trial, newest first (a design is open information). */
export const GET = handle(async (_req: Request, ctx: Ctx) => {
  const { trial } = await requireTrialAccess(Number((await ctx.params).trialId), "viewOpen");
  const versions = await fetchDesignVersions(trial.id);
  return NextResponse.json({ designs: versions.map(designVersionJson) });
});

/** The first draft: { spec }. 409 when a draft exists or the design is locked (amend it instead). */
export const POST = handle(async (req: Request, ctx: Ctx) => {
  const access = await requireTrialAccess(Number((await ctx.params).trialId), "editDesign");
  const body = specBodySchema.parse(await readJson(req));
  const created = await createDraftDesign(access, body.spec);
  return NextResponse.json({ design: designVersionJson(created) }, { status: 201 });
});
