import { idFrom } from "@/lib/route-params";
import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle, readJson } from "@/lib/http";
import { fetchDesignVersions } from "@/db/queries/designs";
import { lockBodySchema } from "@/lib/design/api-schemas";
import { lockDesign } from "@/lib/design/service";
import { designVersionJson } from "@/lib/design/serialize";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ trialId: string; designId: string }> };

/** Locks a draft with an e-signature: { password, rowVersion }. Wrong password 422; stale or not a draft 409. */
export const POST = handle(async (req: Request, ctx: Ctx) => {
  const p = await ctx.params;
  const access = await requireTrialAccess(idFrom(p.trialId, "That trial"), "lockDesign");
  const body = lockBodySchema.parse(await readJson(req, 16 * 1024));
  const locked = await lockDesign(access, idFrom(p.designId, "That design"), body.rowVersion, body.password);
  const listing = (await fetchDesignVersions(access.trial.id)).find((d) => d.id === locked.id) ?? locked;
  return NextResponse.json({ design: designVersionJson(listing) });
});
