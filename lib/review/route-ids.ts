/** Route parameters of the closed review's handlers: anything but a plain positive id is a 404. */
import { notFoundError } from "@/lib/http";

export function routeId(raw: string | undefined, what: string): number {
  if (!raw || !/^[1-9][0-9]{0,9}$/.test(raw) || Number(raw) > 2_147_483_647) throw notFoundError(what);
  return Number(raw);
}

export type AnalysisRouteContext = { params: Promise<{ trialId: string; analysisId: string }> };

export async function analysisRouteIds(ctx: AnalysisRouteContext): Promise<{ trialId: number; analysisId: number }> {
  const p = await ctx.params;
  return { trialId: routeId(p.trialId, "That trial"), analysisId: routeId(p.analysisId, "That analysis") };
}
