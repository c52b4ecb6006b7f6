import { NextResponse } from "next/server";
import { requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { fetchLatestLettersOfTrial, fetchLookSchedule, fetchRecommendationsOpen } from "@/db/queries/open-status";


export const dynamic = "force-dynamic";

/** Open status for everyone on the trial: accrual, looks, timeliness, recommendations (no outcome data). */
export const GET = handle(async (req: Request, ctx: { params: Promise<{ trialId: string }> }) => {
  const trialId = Number((await ctx.params).trialId);
  const { trial } = await requireTrialAccess(trialId, "viewOpen", { bearer: req });
  const [looks, recommendations, letters] = await Promise.all([fetchLookSchedule(trial.id), fetchRecommendationsOpen(trial.id), fetchLatestLettersOfTrial(trial.id)]);
  return NextResponse.json({
    trial: { id: trial.id, code: trial.code, title: trial.title, targetEnrolment: trial.target_enrolment, status: trial.status },
    looks: looks.map((l) => ({
      lookNumber: l.look_number,
      plannedN: l.planned_n,
      cutoffDate: l.cutoff_date,
      enrolledTotal: l.enrolled_total,
      status: l.status,
      lockedAt: l.locked_at,
    })),
    recommendations,
    // The committee's letters to the sponsor (latest version per meeting): no data, no votes.
    letters: letters.map((l) => ({ lookNumber: l.lookNumber, meetingId: l.meetingId, version: l.version, contentHash: l.contentHash, signedBy: l.signerName, signedAt: l.createdAt, url: `/api/trials/${trial.id}/meetings/${l.meetingId}/letter?version=${l.version}` })),
  });
});
