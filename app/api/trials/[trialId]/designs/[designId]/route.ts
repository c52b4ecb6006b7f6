import { idFrom } from "@/lib/route-params";
import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, notFoundError, readJson } from "@/lib/http";
import { fetchDesignVersions } from "@/db/queries/designs";
import { updateDraftBodySchema } from "@/lib/design/api-schemas";
import { updateDraftDesign } from "@/lib/design/service";
import { designVersionJson } from "@/lib/design/serialize";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ trialId: string; designId: string }> };

/** One design version with its signature, if locked. */
export const GET = handle(async (_req: Request, ctx: Ctx) => {
  const p = await ctx.params;
  const { trial } = await requireTrialAccess(idFrom(p.trialId, "That trial"), "viewOpen");
  const found = (await fetchDesignVersions(trial.id)).find((d) => String(d.id) === p.designId);
  if (!found) throw notFoundError("That design version");
  return NextResponse.json({ design: designVersionJson(found) });
});

/** Saves a draft: { spec, rowVersion }. 409 when stale or not a draft. */
export const PUT = handle(async (req: Request, ctx: Ctx) => {
  const p = await ctx.params;
  const access = await requireTrialAccess(idFrom(p.trialId, "That trial"), "editDesign");
  const body = updateDraftBodySchema.parse(await readJson(req));
  const saved = await updateDraftDesign(access, idFrom(p.designId, "That design"), body.rowVersion, body.spec);
  return NextResponse.json({ design: designVersionJson(saved) });
});
