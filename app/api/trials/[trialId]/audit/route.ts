import { NextResponse } from "next/server";
import { z } from "zod";
import { allows, requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { fetchAuditEvents } from "@/db/audit";
import { auditEntryJson } from "@/lib/audit/audit-json";
import { idFrom } from "@/lib/route-params";

export const dynamic = "force-dynamic";

const querySchema = z.object({ limit: z.coerce.number().int().min(1).max(5000).default(2000) });

/**
 * The trial's audit trail, newest first. Roles without viewAuditClosed get open entries only,
 * selected with openOnly so closed rows never leave the database.
 */
export const GET = handle(async (req: Request, ctx: { params: Promise<{ trialId: string }> }) => {
  const trialId = idFrom((await ctx.params).trialId, "That trial");
  const { principal } = await requireTrialAccess(trialId, "viewAuditOpen");
  const { limit } = querySchema.parse(Object.fromEntries(new URL(req.url).searchParams));
  const openOnly = !allows(principal, "viewAuditClosed");
  const rows = await fetchAuditEvents({ trialId, openOnly, limit });
  return NextResponse.json({ openOnly, entries: rows.map((r) => auditEntryJson(r, { hashes: !openOnly })) });
});
