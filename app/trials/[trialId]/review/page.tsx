import type { Metadata } from "next";
import Link from "next/link";
import { authorizePage } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchAnalysesOpen } from "@/db/queries/analyses";
import { fetchRecommendationsOpen } from "@/db/queries/open-status";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { ANALYSIS_STATUS_LABELS, DECISION_LABELS } from "@/lib/format";

export const metadata: Metadata = { title: "Closed review" };
export const dynamic = "force-dynamic";

/** The locked and reviewed analyses a DMC member or the unblinded statistician can open. */
export default async function ClosedReviewListPage({ params }: { params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial } = await authorizePage(trialId, "viewClosed");
  const [analyses, recommendations] = await Promise.all([fetchAnalysesOpen(trial.id), fetchRecommendationsOpen(trial.id)]);
  const reviewable = analyses.filter((a) => a.status === "locked" || a.status === "reviewed").reverse();
  return (
    <Card title="Closed review: locked analyses">
      {reviewable.length === 0 ? (
        <p className="text-sm text-stone-600">No analysis has been locked yet. The unblinded statistician locks each look after entering its data.</p>
      ) : (
        <table className="cairn-table" aria-label="Locked analyses">
          <thead>
            <tr>
              <th>Look</th>
              <th>Data cut-off</th>
              <th>Status</th>
              <th>Locked</th>
              <th>Recommendation</th>
              <th />
            </tr>
          </thead>
          <tbody>
            {reviewable.map((a) => {
              const rec = recommendations.find((r) => r.analysisId === a.id);
              return (
                <tr key={a.id}>
                  <td>{a.look_number}</td>
                  <td>{a.cutoff_date ?? "—"}</td>
                  <td>
                    <Badge tone={a.status === "reviewed" ? "lichen" : "teal"}>{ANALYSIS_STATUS_LABELS[a.status]}</Badge>
                  </td>
                  <td>{a.locked_at ? new Date(a.locked_at).toISOString().slice(0, 10) : "—"}</td>
                  <td>
                    {rec ? DECISION_LABELS[rec.decision] : "—"}
                    {rec?.superseded ? <> <Badge tone="amber">{`superseded: review version ${a.review_version} in force`}</Badge></> : null}
                  </td>
                  <td>
                    <Link className="font-medium text-lichen-700 underline" href={`/trials/${trial.id}/review/${a.id}`}>
                      {`Open look ${a.look_number}`}
                    </Link>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
    </Card>
  );
}
