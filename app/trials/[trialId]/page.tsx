import type { Metadata } from "next";
import { authorizePage } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchLookSchedule, fetchRecommendationsOpen } from "@/db/queries/open-status";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { ANALYSIS_STATUS_LABELS, DECISION_LABELS } from "@/lib/format";
import { differenceInCalendarDays, format } from "date-fns";

export const metadata: Metadata = { title: "Open status" };

export default async function TrialOverviewPage({ params }: { params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial } = await authorizePage(trialId, "viewOpen");
  const [looks, recommendations] = await Promise.all([fetchLookSchedule(trial.id), fetchRecommendationsOpen(trial.id)]);
  const latest = recommendations[0];
  const enrolled = looks.filter((l) => l.enrolled_total !== null).at(-1)?.enrolled_total ?? 0;
  return (
    <div className="grid gap-4 lg:grid-cols-3">
      <Card title="Accrual">
        <p className="text-3xl font-semibold tabular-nums" data-testid="accrual">
          {enrolled} <span className="text-base font-normal text-stone-500">of {trial.target_enrolment} planned</span>
        </p>
        <p className="mt-1 text-xs text-stone-500">Pooled across arms, at the latest data cut-off.</p>
      </Card>
      <Card title="Latest DMC recommendation" className="lg:col-span-2">
        {latest ? (
          <div data-testid="latest-recommendation">
            <p className="text-lg font-semibold">{DECISION_LABELS[latest.decision]}</p>
            <p className="text-sm text-stone-600">
              Look {latest.lookNumber} · recorded {format(new Date(latest.recordedAt), "d MMM yyyy")} · signed by {latest.signerName}
            </p>
          </div>
        ) : (
          <p className="text-sm text-stone-600">No recommendation has been recorded yet.</p>
        )}
      </Card>
      <Card title="Look schedule" className="lg:col-span-3">
        {looks.length === 0 ? (
          <p className="text-sm text-stone-600">No looks are planned yet: they are created when the design is locked.</p>
        ) : (
          <table className="cairn-table" aria-label="Look schedule">
            <thead>
              <tr>
                <th>Look</th>
                <th>Planned size</th>
                <th>Data cut-off</th>
                <th>Enrolled (pooled)</th>
                <th>Status</th>
                <th>Days from cut-off to lock</th>
              </tr>
            </thead>
            <tbody>
              {looks.map((l) => (
                <tr key={l.id}>
                  <td>{l.look_number}</td>
                  <td>{l.planned_n}</td>
                  <td>{l.cutoff_date ?? "—"}</td>
                  <td>{l.enrolled_total ?? "—"}</td>
                  <td>
                    <Badge tone={l.status === "reviewed" ? "lichen" : l.status === "locked" ? "teal" : "neutral"}>{ANALYSIS_STATUS_LABELS[l.status]}</Badge>
                  </td>
                  <td>{l.cutoff_date && l.locked_at ? differenceInCalendarDays(new Date(l.locked_at), new Date(l.cutoff_date)) : "—"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Card>
    </div>
  );
}
