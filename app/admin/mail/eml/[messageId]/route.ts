import { requireAdmin } from "@/lib/auth";
import { handle, notFoundError } from "@/lib/http";
import { readCaughtEml } from "../../caught";

export const dynamic = "force-dynamic";

/** The raw .eml of a caught message, for administrators. */
export const GET = handle(async (_req: Request, ctx: { params: Promise<{ messageId: string }> }) => {
  await requireAdmin();
  const id = (await ctx.params).messageId;
  const eml = await readCaughtEml(id);
  if (!eml) throw notFoundError("That message");
  return new Response(new Uint8Array(eml), {
    headers: {
      "Content-Type": "message/rfc822",
      "Content-Disposition": `attachment; filename="${id}.eml"`,
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
    },
  });
});
