import { NextResponse } from "next/server";
import { z } from "zod";
import { closedConnection, requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { loadArmPosterior } from "@/lib/review/load-review";
import { intervalProbabilityOf } from "@/lib/review/compute-review";
import { lookIds, type LookRouteParams } from "@/lib/route-params";

export const dynamic = "force-dynamic";

const bound = (name: string) =>
  z.coerce
    .number({ message: `${name} must be a number.` })
    .refine(Number.isFinite, `${name} must be a number.`)
    .refine((v) => v >= 0 && v <= 1, `${name} must lie between 0 and 1.`);

const querySchema = z
  .object({
    arm: z.coerce.number({ message: "arm must be an arm id." }).int("arm must be an arm id.").positive("arm must be an arm id."),
    lo: bound("lo"),
    hi: bound("hi"),
  })
  .refine((q) => q.lo < q.hi, { message: "lo must be below hi.", path: ["hi"] });

/** CLOSED: the reviewer's interval question, P(lo < p <= hi | data) for one arm at this look. */
export const GET = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "viewClosed");
  const { trial } = access;
  const sp = new URL(req.url).searchParams;
  const q = querySchema.parse({ arm: sp.get("arm") ?? undefined, lo: sp.get("lo") ?? undefined, hi: sp.get("hi") ?? undefined });
  const posterior = await loadArmPosterior(trial, analysisId, q.arm, closedConnection(access));
  return NextResponse.json({ arm: q.arm, lo: q.lo, hi: q.hi, probability: intervalProbabilityOf(posterior, q.lo, q.hi) }, { headers: { "Cache-Control": "no-store" } });
});
