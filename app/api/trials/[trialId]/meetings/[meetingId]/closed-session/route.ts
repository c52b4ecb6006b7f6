import { NextResponse } from "next/server";
import { z } from "zod";
import { closedConnection, requireTrialAccess } from "@/lib/auth";
import { handle, notFoundError } from "@/lib/http";
import { fetchMeeting } from "@/db/queries/meetings";
import { fetchClosedMinutes, fetchMeetingRecommendationsClosed, fetchVotes, tallyVotes } from "@/db/queries/committee-closed";

export const dynamic = "force-dynamic";

const paramsSchema = z.object({
  trialId: z.coerce.number().int().positive().max(2_147_483_647),
  meetingId: z.coerce.number().int().positive().max(2_147_483_647),
});

/** CLOSED: the votes with their comments, the tally, the committee's recommendations with dissent, and the closed minutes. DMC and unblinded statistician only. */
export const GET = handle(async (_req: Request, ctx: { params: Promise<{ trialId: string; meetingId: string }> }) => {
  const parsed = paramsSchema.safeParse(await ctx.params);
  if (!parsed.success) throw notFoundError("That meeting");
  const access = await requireTrialAccess(parsed.data.trialId, "viewClosed");
  const closed = closedConnection(access);
  const meeting = await fetchMeeting(access.trial.id, parsed.data.meetingId, closed);
  if (!meeting) throw notFoundError("That meeting");
  const [votes, recommendations, minutes] = await Promise.all([fetchVotes(meeting.id, closed), fetchMeetingRecommendationsClosed(meeting.id, closed), fetchClosedMinutes(meeting.id, closed)]);
  return NextResponse.json({ meetingId: meeting.id, lookNumber: meeting.lookNumber, votes, tally: tallyVotes(votes), recommendations, closedMinutes: minutes });
});
