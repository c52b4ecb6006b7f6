import { idFrom } from "@/lib/route-params";
import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { amendBodySchema } from "@/lib/design/api-schemas";
import { amendDesign } from "@/lib/design/service";
import { designVersionJson } from "@/lib/design/serialize";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ trialId: string; designId: string }> };

/** Starts an amendment of the locked charter version: { reason } (required). Returns the new draft (201). */
export const POST = handle(async (req: Request, ctx: Ctx) => {
  const p = await ctx.params;
  const access = await requireTrialAccess(idFrom(p.trialId, "That trial"), "editDesign");
  const body = amendBodySchema.parse(await readJson(req, 16 * 1024));
  const draft = await amendDesign(access, idFrom(p.designId, "That design"), body.reason);
  return NextResponse.json({ design: designVersionJson(draft) }, { status: 201 });
});
