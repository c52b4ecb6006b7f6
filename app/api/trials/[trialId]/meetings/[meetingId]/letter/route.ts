import { z } from "zod";
import { requireTrialAccess } from "@/lib/auth";
import { handle, notFoundError } from "@/lib/http";
import { fetchLetterPdf } from "@/db/queries/committee";

export const dynamic = "force-dynamic";

const paramsSchema = z.object({
  trialId: z.coerce.number().int().positive().max(2_147_483_647),
  meetingId: z.coerce.number().int().positive().max(2_147_483_647),
});
const versionSchema = z.union([z.null(), z.coerce.number().int().positive().max(2_147_483_647)]);

/**
 * The committee's recommendation letter to the sponsor (PDF): anyone on the trial, the sponsor
 * first of all. The latest version, or `?version=n`. It holds no data and no votes.
 */
export const GET = handle(async (req: Request, ctx: { params: Promise<{ trialId: string; meetingId: string }> }) => {
  const parsed = paramsSchema.safeParse(await ctx.params);
  const version = versionSchema.safeParse(new URL(req.url).searchParams.get("version"));
  if (!parsed.success) throw notFoundError("That letter");
  const { trial, reader } = await requireTrialAccess(parsed.data.trialId, "viewOpen");
  if (!version.success) throw notFoundError("That letter");
  const letter = await fetchLetterPdf(trial.id, parsed.data.meetingId, version.data, reader);
  if (!letter) throw notFoundError("That letter");
  const name = `${trial.code}-dmc-recommendation-letter-v${letter.version}.pdf`.replace(/[^A-Za-z0-9._-]/g, "_");
  const pdf = Buffer.from(letter.pdf);
  return new Response(new Uint8Array(pdf), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Content-Length": String(pdf.length),
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
      "X-Cairn-Content-Hash": letter.contentHash,
    },
  });
});
