import { notFoundError } from "@/lib/http";

export type LookRouteParams = { params: Promise<{ trialId: string; analysisId: string }> };

/** Route ids from the URL; anything that is not a positive integer is a 404, never a 500. */
export function idFrom(raw: string | undefined, what: string): number {
  if (!raw || !/^[1-9][0-9]{0,9}$/.test(raw) || Number(raw) > 2_147_483_647) throw notFoundError(what);
  return Number(raw);
}

export async function lookIds(ctx: LookRouteParams): Promise<{ trialId: number; analysisId: number }> {
  const p = await ctx.params;
  return { trialId: idFrom(p.trialId, "That trial"), analysisId: idFrom(p.analysisId, "That look") };
}
