import { z } from "zod";
import { requireTrialAccess } from "@/lib/auth";
import { handle, HttpError, notFoundError } from "@/lib/http";
import { fetchMeeting } from "@/db/queries/meetings";
import { fetchPacketMeta, fetchPacketPdf } from "@/db/queries/packets";
import { mayDownloadPacket } from "@/lib/packets/access";

export const dynamic = "force-dynamic";

const paramsSchema = z.object({
  trialId: z.coerce.number().int().positive().max(2_147_483_647),
  meetingId: z.coerce.number().int().positive().max(2_147_483_647),
  packetId: z.coerce.number().int().positive().max(2_147_483_647),
});

/**
 * A packet PDF. Open reports: anyone on the trial. Closed reports: DMC members and the unblinded
 * statistician only (403 for blinded roles, administrators included). The audience is read from
 * the packet's metadata before its bytes are.
 */
export const GET = handle(async (_req: Request, ctx: { params: Promise<{ trialId: string; meetingId: string; packetId: string }> }) => {
  const parsed = paramsSchema.safeParse(await ctx.params);
  if (!parsed.success) throw notFoundError("That packet");
  const { trialId, meetingId, packetId } = parsed.data;
  const { trial, principal } = await requireTrialAccess(trialId, "viewOpen");
  const meeting = await fetchMeeting(trial.id, meetingId);
  const meta = meeting ? await fetchPacketMeta(packetId) : undefined;
  if (!meeting || !meta || meta.meeting_id !== meeting.id) throw notFoundError("That packet");
  if (!mayDownloadPacket(principal, meta.audience)) throw new HttpError(403, "The closed report is for DMC members and the unblinded statistician only.");
  const packet = await fetchPacketPdf(meta.id);
  if (!packet) throw notFoundError("That packet");
  const name = `${trial.code}-${meta.audience}-report-v${meta.version}.pdf`.replace(/[^A-Za-z0-9._-]/g, "_");
  return new Response(new Uint8Array(packet.pdf), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Content-Length": String(packet.pdf.length),
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
      "X-Cairn-Content-Hash": meta.content_hash,
      "X-Cairn-Engine-Version": meta.engine_version,
    },
  });
});
