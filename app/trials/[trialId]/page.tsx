import type { Metadata } from "next";
import { authorizePage } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchLatestLettersOfTrial, fetchLookSchedule, fetchRecommendationsOpen } from "@/db/queries/open-status";

import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { AccrualChart } from "@/components/review/accrual-chart";
import { ANALYSIS_STATUS_LABELS, DECISION_LABELS } from "@/lib/format";
import { differenceInCalendarDays } from "date-fns";

export const metadata: Metadata = { title: "Open status" };
export const dynamic = "force-dynamic";

const isoDay = (d: Date | string) => new Date(d).toISOString().slice(0, 10);

/**
 * OPEN status, for everyone on the trial (blinded roles included). Reads only
 * db/queries/open-status.ts: pooled enrolment, look schedule, timeliness and the recommendation's
 * decision and date. No arm-level or outcome data reaches this page.
 */
export default async function TrialOverviewPage({ params }: { params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial } = await authorizePage(trialId, "viewOpen");
  const [looks, recommendations, letters] = await Promise.all([fetchLookSchedule(trial.id), fetchRecommendationsOpen(trial.id), fetchLatestLettersOfTrial(trial.id)]);
  const latest = recommendations[0];
  const happened = looks.filter((l) => l.status === "locked" || l.status === "reviewed");
  const accrual = looks.filter((l) => l.cutoff_date && l.enrolled_total !== null).map((l) => ({ date: l.cutoff_date as string, enrolled: l.enrolled_total as number, look: l.look_number }));
  const enrolled = accrual.at(-1)?.enrolled ?? 0;
  const lags = happened.filter((l) => l.cutoff_date && l.locked_at).map((l) => differenceInCalendarDays(new Date(isoDay(l.locked_at as Date)), new Date(l.cutoff_date as string)));
  const next = looks.find((l) => l.status === "planned" || l.status === "open");
  // Two arms: a look's planned size counts patients in each arm; accrual is pooled across arms.
  const perArm = trial.design_type === "two" ? " per arm" : "";
  return (
    <div className="grid grid-cols-1 gap-4 lg:grid-cols-3">
      <Card title="Accrual">
        <p className="text-3xl font-semibold tabular-nums" data-testid="accrual">
          {enrolled} <span className="text-base font-normal text-stone-500">of {trial.target_enrolment} planned{perArm ? " in all arms" : ""}</span>
        </p>
        <p className="mt-1 text-xs text-stone-500">Pooled across arms, at the latest data cut-off.</p>
      </Card>
      <Card title="Latest DMC recommendation">
        {latest ? (
          <div data-testid="latest-recommendation">
            <p className="text-lg font-semibold">{DECISION_LABELS[latest.decision]}</p>
            <p className="text-sm text-stone-600">
              Look {latest.lookNumber} · recorded {isoDay(latest.recordedAt)}
              {latest.correctsId ? " · corrects an earlier entry" : ""}
            </p>
            {latest.superseded ? (
              <p className="mt-1 text-sm" data-testid="recommendation-superseded">
                <Badge tone="amber">superseded</Badge> The look was reopened for a correction after this recommendation; a new review is due.
              </p>
            ) : null}
            {letters.filter((l) => l.lookNumber === latest.lookNumber).slice(0, 1).map((l) => (
              <p key={l.id} className="mt-1 text-sm">
                <a href={`/api/trials/${trial.id}/meetings/${l.meetingId}/letter?version=${l.version}`} data-testid="recommendation-letter-link" download>
                  The committee&apos;s letter to the sponsor (PDF, version {l.version}, signed by {l.signerName})
                </a>
              </p>
            ))}
          </div>
        ) : (
          <p className="text-sm text-stone-600">No recommendation has been recorded yet.</p>
        )}
      </Card>
      <Card title="Data timeliness">
        <p className="text-3xl font-semibold tabular-nums" data-testid="timeliness">
          {lags.length ? `${lags.at(-1)} days` : "—"}
        </p>
        <p className="mt-1 text-xs text-stone-500">
          From data cut-off to lock at the latest look{lags.length > 1 ? `; mean over ${lags.length} looks ${(lags.reduce((a, b) => a + b, 0) / lags.length).toFixed(1)} days` : ""}.
          {next ? ` Next: look ${next.look_number} at ${next.planned_n} patients${perArm}.` : ""}
        </p>
      </Card>
      <Card title="Accrual over time" className="lg:col-span-3">
        {accrual.length === 0 ? <p className="text-sm text-stone-600">No data cut-off has been recorded yet.</p> : <AccrualChart points={accrual} target={trial.target_enrolment} firstPatientOn={trial.first_patient_on} />}
      </Card>
      <Card title="Look schedule" className="lg:col-span-3">
        {looks.length === 0 ? (
          <p className="text-sm text-stone-600">No looks are planned yet: they are created when the design is locked.</p>
        ) : (
          <table className="cairn-table" aria-label="Look schedule">
            <thead>
              <tr>
                <th>Look</th>
                <th>Planned size{perArm ? " (per arm)" : ""}</th>
                <th>Happened</th>
                <th>Data cut-off</th>
                <th>Enrolled (pooled)</th>
                <th>Status</th>
                <th>Days from cut-off to lock</th>
                <th>Recommendation</th>
              </tr>
            </thead>
            <tbody>
              {looks.map((l) => {
                const rec = recommendations.find((r) => r.analysisId === l.id);
                return (
                  <tr key={l.id}>
                    <td>{l.look_number}</td>
                    <td>{l.planned_n}</td>
                    <td>{l.status === "locked" || l.status === "reviewed" ? "Yes" : "Not yet"}</td>
                    <td>{l.cutoff_date ?? "—"}</td>
                    <td>{l.enrolled_total ?? "—"}</td>
                    <td>
                      <Badge tone={l.status === "reviewed" ? "lichen" : l.status === "locked" ? "teal" : "neutral"}>{ANALYSIS_STATUS_LABELS[l.status]}</Badge>
                    </td>
                    <td>{l.cutoff_date && l.locked_at ? differenceInCalendarDays(new Date(isoDay(l.locked_at)), new Date(l.cutoff_date)) : "—"}</td>
                    <td>
                      {rec ? `${DECISION_LABELS[rec.decision]} (${isoDay(rec.recordedAt)})` : "—"}
                      {rec?.superseded ? <> <Badge tone="amber">superseded</Badge></> : null}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        )}
      </Card>
    </div>
  );
}
