import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { authorizePage, allows, closedConnection } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { HttpError } from "@/lib/http";
import { StatsDomainError } from "@/lib/stats/validate";
import { loadReview } from "@/lib/review/load-review";
import { fetchRecommendationsClosed } from "@/db/queries/recommendations";
import { fetchMeetings } from "@/db/queries/meetings";
import { fetchPackets } from "@/db/queries/packets";
import { fetchClosedAgenda } from "@/db/queries/closed";
import { formatMeetingTime } from "@/lib/packets/meeting-time";
import { ActionButton } from "@/components/meetings/forms";
import { prepareClosedPacketAction } from "./packet-actions";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { Banner } from "@/components/ui/banner";
import { buttonClass } from "@/components/ui/button";
import { DataGrid } from "@/components/grid/data-grid";
import { BoundaryPlot, DifferencePlot, PredictiveOverLooksPlot, ToxicityPlot } from "@/components/review/review-charts";
import { IntervalQuestion } from "@/components/review/interval-question";
import { WhatItTakes } from "@/components/review/what-it-takes";
import { WhatIf } from "@/components/review/what-if";
import { whatItTakesPanel } from "@/lib/review/what-if";
import { RecommendationForm } from "@/components/review/recommendation-form";
import { recordRecommendationAction } from "./actions";
import { fetchCommittee } from "@/db/queries/committee";
import { ReopenReviewForm } from "@/components/review/reopen-review-form";
import { ANALYSIS_STATUS_LABELS, DECISION_LABELS, formatBoundary, formatProbability, formatRate } from "@/lib/format";
import type { Interval, HpdRegion } from "@/lib/review/posterior-summary";
import type { Review } from "@/lib/review/compute-review";

export const metadata: Metadata = { title: "Closed review" };
export const dynamic = "force-dynamic";

const interval = (i: Interval) => `${formatRate(i.lower)} to ${formatRate(i.upper)}`;
const hpdText = (h: HpdRegion) => h.pieces.map(interval).join(" and ") + (h.note ? ` (${h.note})` : "");

function decisionTone(d: Review["decision"]): "danger" | "warning" | "success" | "info" {
  if (d.action === "stop") return d.stop === "safety" ? "danger" : "warning";
  if (d.action === "final") return d.success ? "success" : "warning";
  return "info";
}

function decisionTitle(d: Review["decision"]): string {
  if (d.action === "stop") return `Under the locked rule the data favour stopping for ${d.stop}`;
  if (d.action === "final") return d.success ? "Final analysis: the success criterion is met" : "Final analysis: the success criterion is not met";
  return "Under the locked rule the data support continuing";
}

export default async function ClosedReviewPage({ params }: { params: Promise<{ trialId: string; analysisId: string }> }) {
  const p = await params;
  const trialId = parseId(p.trialId);
  const analysisId = parseId(p.analysisId);
  const access = await authorizePage(trialId, "viewClosed");
  const { trial, principal, user } = access;
  let loaded;
  try {
    loaded = await loadReview(trial, analysisId, closedConnection(access));
  } catch (e) {
    if (e instanceof HttpError && e.status === 409) return <Banner tone="warning" title="Nothing to review yet">{e.message}</Banner>;
    if (e instanceof StatsDomainError)
      return (
        <Banner tone="warning" title="The review cannot be computed from the stored data">
          {e.message}. The unblinded statistician can reopen the look and correct its data.
        </Banner>
      );
    if (e instanceof HttpError && e.status === 404) {
      notFound();
    }
    throw e;
  }
  const { review, analysis, input, designVersion } = loaded;
  const recommendations = await fetchRecommendationsClosed(trial.id, analysisId);
  // The meetings that review this look, with their closed agenda and closed packet versions: this
  // page is the one place the closed packet is prepared (only unblinded roles reach it).
  const closed = closedConnection(access);
  const meetings = await Promise.all(
    (await fetchMeetings(trial.id))
      .filter((m) => m.analysis_id === analysisId)
      .map(async (m) => ({ meeting: m, closedAgenda: await fetchClosedAgenda(m.id, closed), packets: await fetchPackets(m.id, ["closed"]) })),
  );
  const prepare = allows(principal, "manageMeetings");
  const hasCommittee = (await fetchCommittee(trial.id, closed)).length > 0;
  // Recommendations of an earlier review version are superseded, never corrected.
  const current = recommendations.find((r) => r.correctedById === null && !r.superseded) ?? null;
  const nText = (o: { n: number; nControl: number | null }) => (o.nControl === null ? String(o.n) : `${o.n} / ${o.nControl}`);
  const REGION = { futility: "futility region", continue: "between the boundaries", efficacy: "efficacy region" } as const;
  const design = input.design;
  const single = review.designKind === "single";
  const rule = design.rule;
  const defaultLo = single && design.arms === "single" ? design.p0 : 0.2;
  const defaultHi = single && design.arms === "single" ? design.p1 : 0.5;

  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <p className="text-sm text-stone-600">
            <Link href={`/trials/${trial.id}/review`} className="underline">
              Closed review
            </Link>{" "}
            · Look {review.lookNumber} · data cut-off {review.cutoffDate ?? "—"} · <Badge tone={analysis.status === "reviewed" ? "lichen" : "teal"}>{ANALYSIS_STATUS_LABELS[analysis.status]}</Badge>
          </p>
          <p className="text-sm text-stone-600" data-testid="review-versions">
            Computed under design version {designVersion.version}
            {designVersion.status === "superseded" ? " (the version this look was locked under; a later amendment is now in force)" : ""} · review version {analysis.review_version}
            {analysis.amendment_count > 0 ? ` · amendment ${analysis.amendment_count}` : ""}
          </p>
          <h2 className="mt-1 text-xl font-semibold">Interim analysis, look {review.lookNumber}</h2>
        </div>
        <div className="flex flex-wrap gap-2">
          <a className={buttonClass("secondary")} href={`/api/trials/${trial.id}/analyses/${analysisId}/review/export`} download>
            Download reproducibility record (JSON)
          </a>
          <a className={buttonClass("secondary")} href={`/api/trials/${trial.id}/analyses/${analysisId}/review/r-script`} download data-testid="r-script-download" title="A base-R script that recomputes this look's numbers and prints each next to Cairn's value">
            Download R script
          </a>
        </div>
      </div>

      <Banner tone={decisionTone(review.decision)} title={decisionTitle(review.decision)}>
        <p data-testid="decision-reason">{review.decision.reason}</p>
      </Banner>

      {review.safety?.crossed ? (
        <Banner tone="danger" title="Safety boundary crossed">
          P(toxicity rate &gt; {review.safety.limitLabel ?? formatRate(review.safety.qmax)}) = {formatProbability(review.safety.probAboveLimit)}, above the toxicity alarm level {review.safety.thetaS}.
        </Banner>
      ) : null}

      <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
        <Card title="Posterior response rate" className="lg:col-span-2">
          <table className="cairn-table" aria-label="Posterior summaries">
            <thead>
              <tr>
                <th>Arm</th>
                <th>Responders / evaluable / pending</th>
                <th>Mean</th>
                <th>Median</th>
                <th>SD</th>
                <th>{Math.round(review.credibleLevel * 100)}% equal-tailed</th>
                <th>{Math.round(review.credibleLevel * 100)}% HPD</th>
                {single ? <th>P(rate &gt; p0)</th> : null}
                <th>Clopper-Pearson {Math.round(review.credibleLevel * 100)}%</th>
                <th>Wilson {Math.round(review.credibleLevel * 100)}%</th>
              </tr>
            </thead>
            <tbody>
              {review.arms.map((a) => (
                <tr key={a.armId}>
                  <td>{a.label}</td>
                  <td className="tabular-nums" data-testid="arm-counts">{`${a.responders} / ${a.evaluable} / ${a.pending}`}</td>
                  <td>{formatRate(a.summary.mean)}</td>
                  <td>{formatRate(a.summary.median)}</td>
                  <td>{formatRate(a.summary.sd)}</td>
                  <td>{interval(a.summary.equalTailed)}</td>
                  <td>{hpdText(a.summary.hpd)}</td>
                  {single ? <td>{formatProbability(a.probAboveP0)}</td> : null}
                  <td>{interval(a.clopperPearson)}</td>
                  <td>{interval(a.wilson)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="mt-2 text-xs text-stone-500">
            Pending: enrolled by the cut-off, response not yet known; they count among the patients still to come in the predictive probability. Clopper-Pearson (exact) and Wilson (score) are frequentist intervals, shown for comparison. {single && design.arms === "single" ? `p0 = ${formatRate(design.p0)}.` : ""}
          </p>
        </Card>

        <Card title="Ask about an interval (density and cumulative curve)" className="lg:col-span-2">
          <p className="mb-2 text-sm text-stone-600">How likely is the response rate between two values, given the data at this look?</p>
          <IntervalQuestion trialId={trial.id} analysisId={analysisId} review={{ arms: review.arms, reference: review.reference, credibleLevel: review.credibleLevel }} defaultLo={defaultLo} defaultHi={defaultHi} />
        </Card>

        {review.difference ? (
          <Card title="Difference between arms">
            <p className="text-sm" data-testid="difference-probability">
              P(pT − pC &gt; {review.difference.delta}) = <strong>{formatProbability(review.difference.probExceeds)}</strong>
            </p>
            <DifferencePlot grid={review.difference.grid} delta={review.difference.delta} />
          </Card>
        ) : null}

        <Card title={rule.kind === "predictive" ? "Predictive probability of success" : "Posterior monitoring probability"}>
          <p className="text-sm">
            Now:{" "}
            <strong data-testid="current-monitoring-probability">
              {formatProbability(rule.kind === "predictive" ? review.current.evaluation.predictiveProbability : review.current.evaluation.posteriorProbabilityMonitoring)}
            </strong>
            {review.current.evaluation.final ? " (final analysis: the posterior rule applies)" : ""}
          </p>
          <PredictiveOverLooksPlot history={review.history} ruleKind={rule.kind} futilityThreshold={rule.futilityThreshold} efficacyThreshold={rule.efficacyStopping ? rule.efficacyThreshold : null} />
        </Card>

        <Card title="Stopping boundaries" className="lg:col-span-2">
          <BoundaryPlot boundaries={review.boundaries} observedPath={review.observedPath} observedBoundaries={review.observedBoundaries} twoArms={!single} />
          <table className="cairn-table my-3" aria-label="Looks done against the boundaries at their actual size">
            <caption className="text-left text-sm text-stone-600">Each look done, against the boundaries computed at the number of evaluable patients actually observed{single ? "" : " (experimental arm, read at the observed control count)"}, beside those of its planned size.</caption>
            <thead>
              <tr>
                <th>Look</th>
                <th>Planned n</th>
                <th>Actual n</th>
                <th>Observed responders</th>
                <th>Futility at actual n</th>
                <th>Efficacy / success at actual n</th>
                <th>Futility / efficacy at planned n</th>
                <th>Where the observation sits</th>
              </tr>
            </thead>
            <tbody>
              {review.observedBoundaries.map((o) => (
                <tr key={o.lookNumber} data-testid="observed-boundary-row">
                  <td>{o.lookNumber}</td>
                  <td>{o.plannedN ?? "—"}</td>
                  <td>{nText(o)}</td>
                  <td>{o.controlResponders === null ? o.responders : `${o.responders} (control ${o.controlResponders})`}</td>
                  <td>{formatBoundary(o.futilityMax)}</td>
                  <td>{formatBoundary(o.efficacyMin)}</td>
                  <td>{o.planned ? `${formatBoundary(o.planned.futilityMax)} / ${formatBoundary(o.planned.efficacyMin)}` : "—"}</td>
                  <td>{o.final ? (o.region === "efficacy" ? "success (final)" : "no success (final)") : REGION[o.region]}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <DataGrid
            label="Boundary table"
            height={Math.min(450, 90 + 42 * review.boundaries.length)}
            csvFileName={`${trial.code}-look-${review.lookNumber}-boundaries.csv`}
            columns={[
              { field: "look", headerName: "Planned look (n)", wrapHeaderText: true, autoHeaderHeight: true, minWidth: 150 },
              { field: "futility", headerName: "Futility: stop at or below", wrapHeaderText: true, autoHeaderHeight: true, minWidth: 150 },
              { field: "efficacy", headerName: "Efficacy / success: at or above", wrapHeaderText: true, autoHeaderHeight: true, minWidth: 150 },
              { field: "observed", headerName: "Observed responders", wrapHeaderText: true, autoHeaderHeight: true, minWidth: 150 },
              ...(single ? [] : [{ field: "control" as const, headerName: "Read at control responders", wrapHeaderText: true, autoHeaderHeight: true, minWidth: 150 }]),
            ]}
            rows={review.boundaries.map((b) => {
              const seen = review.observedBoundaries.find((o) => o.plannedN === b.n) ?? review.observedBoundaries.find((o) => o.plannedN === null && o.n === b.n);
              return {
                look: `${b.n}${b.final ? " (final)" : ""}`,
                futility: formatBoundary(b.futilityMax),
                efficacy: formatBoundary(b.efficacyMin),
                observed: seen ? (seen.n === b.n ? String(seen.responders) : `${seen.responders} of ${seen.n} (look ${seen.lookNumber})`) : "—",
                control: b.controlResponders === undefined ? "" : `${b.controlResponders} (${b.controlBasis})`,
              };
            })}
          />
        </Card>

        {(() => {
          let panel: ReturnType<typeof whatItTakesPanel>;
          try {
            panel = whatItTakesPanel(input);
          } catch (e) {
            if (!(e instanceof StatsDomainError)) throw e;
            return (
              <Card title="What it takes, and what if" className="lg:col-span-2">
                <Banner tone="warning" title="What it takes cannot be computed from the stored counts">
                  {e.message}.
                </Banner>
              </Card>
            );
          }
          return (
            <Card title="What it takes, and what if" className="lg:col-span-2">
              <div className="flex flex-col gap-6" id="what-it-takes">
                <WhatItTakes takes={panel.takes} pending={panel.pending} />
                {panel.nextAhead ? <WhatIf trialId={trial.id} analysisId={analysisId} now={panel.now} rates={panel.rates} maxN={panel.maxN} nextAhead={panel.nextAhead} boundaries={review.boundaries} observedPath={review.observedPath} /> : null}
              </div>
            </Card>
          );
        })()}

        {review.safety ? (
          <Card title="Safety" className="lg:col-span-2">
            <p className="text-sm" data-testid="safety-summary">
              {review.safety.toxicities} with toxicity among {review.safety.treated} treated patients (evaluable for toxicity). P(toxicity rate &gt; {review.safety.limitLabel ?? formatRate(review.safety.qmax)}) = <strong>{formatProbability(review.safety.probAboveLimit)}</strong> (toxicity alarm level {review.safety.thetaS}):{" "}
              {review.safety.crossed ? <Badge tone="berry">boundary crossed</Badge> : <Badge tone="lichen">boundary not crossed</Badge>}
            </p>
            <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
              <ToxicityPlot safety={review.safety} />
              <table className="cairn-table" aria-label="Safety boundary">
                <thead>
                  <tr>
                    <th>Look (n)</th>
                    <th>Safety stop at or above</th>
                    <th>Observed toxicities</th>
                  </tr>
                </thead>
                <tbody>
                  {review.safety.boundary.map((b) => (
                    <tr key={b.n}>
                      <td>{b.n}</td>
                      <td>{formatBoundary(b.toxicityMin)}</td>
                      <td>
                        {(() => {
                          const o = review.safety!.observed.find((x) => x.plannedN === b.n) ?? review.safety!.observed.find((x) => x.plannedN === null && x.n === b.n);
                          return o ? (o.n === b.n ? o.toxicities : `${o.toxicities} of ${o.n} (look ${o.lookNumber})`) : "—";
                        })()}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <table className="cairn-table mt-3" aria-label="Looks done against the safety boundary at their actual size">
              <caption className="text-left text-sm text-stone-600">Each look done, against the safety boundary at the number of patients actually observed, beside that of its planned size.</caption>
              <thead>
                <tr>
                  <th>Look</th>
                  <th>Planned n</th>
                  <th>Actual n</th>
                  <th>Toxicities</th>
                  <th>Stop at or above (actual n)</th>
                  <th>Stop at or above (planned n)</th>
                  <th>Crossed</th>
                </tr>
              </thead>
              <tbody>
                {review.safety.observed.map((o) => (
                  <tr key={o.lookNumber} data-testid="observed-safety-row">
                    <td>{o.lookNumber}</td>
                    <td>{o.plannedN ?? "—"}</td>
                    <td>{o.n}</td>
                    <td>{o.toxicities}</td>
                    <td>{formatBoundary(o.toxicityMin)}</td>
                    <td>{o.planned ? formatBoundary(o.planned.toxicityMin) : "—"}</td>
                    <td>{o.crossed ? <Badge tone="berry">yes</Badge> : "no"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </Card>
        ) : null}

        <Card title="Prior sensitivity" className="lg:col-span-2">
          <table className="cairn-table" aria-label="Prior sensitivity">
            <thead>
              <tr>
                <th>Prior</th>
                <th>Arm</th>
                <th>Posterior mean</th>
                <th>{Math.round(review.credibleLevel * 100)}% equal-tailed</th>
                <th>{single ? "P(rate > p0)" : `P(pT − pC > ${review.difference?.delta ?? 0})`}</th>
                {single ? <th>Predictive probability</th> : null}
              </tr>
            </thead>
            <tbody>
              {review.sensitivity.flatMap((s) =>
                s.arms.map((a, k) => (
                  <tr key={`${s.key}-${a.armId}`}>
                    <td>{k === 0 ? <><strong>{s.label}</strong><br /><span className="text-xs text-stone-500">{s.description}</span></> : null}</td>
                    <td>{review.arms.find((x) => x.armId === a.armId)?.label}</td>
                    <td>{formatRate(a.summary.mean)}</td>
                    <td>{interval(a.summary.equalTailed)}</td>
                    <td>{k === 0 ? formatProbability(single ? a.probAboveP0 : s.probDifferenceExceeds) : ""}</td>
                    {single ? <td>{formatProbability(s.predictiveProbability)}</td> : null}
                  </tr>
                )),
              )}
            </tbody>
          </table>
          <p className="mt-2 text-xs text-stone-500">The sceptical prior is centred on the uninteresting rate with an effective sample size of 10% of the maximum sample size (at least 2 patients).</p>
        </Card>

        <Card title="DMC recommendation" className="lg:col-span-2">
          {recommendations.length === 0 ? <p className="mb-3 text-sm text-stone-600">No recommendation has been recorded for this look yet.</p> : null}
          <ul className="mb-4 flex flex-col gap-3" aria-label="Recorded recommendations">
            {recommendations.map((r) => (
              <li key={r.id} className="rounded-md border border-stone-200 p-3" data-testid="recorded-recommendation">
                <p className="font-semibold">
                  {DECISION_LABELS[r.decision]} {r.superseded ? <Badge tone="amber">{`superseded: made on review version ${r.reviewVersion}; the look was reopened for correction`}</Badge> : null}{" "}
                  {r.correctedById ? <Badge>corrected by entry {r.correctedById}</Badge> : null} {r.correctsId ? <Badge tone="amber">corrects entry {r.correctsId}</Badge> : null}
                </p>
                <p className="mt-1 whitespace-pre-wrap text-sm">{r.rationale}</p>
                <p className="mt-1 text-xs text-stone-500">
                  Entry {r.id} · signed by {r.signerName} ({r.signatureMeaning}) on {new Date(r.signedAt).toISOString().slice(0, 16).replace("T", " ")} UTC
                </p>
              </li>
            ))}
          </ul>
          {analysis.status === "reviewed" && allows(principal, "enterData") ? (
            <div className="mb-4 rounded-md border border-stone-200 p-3">
              <h3 className="mb-2 font-semibold">Correct this look after review</h3>
              <ReopenReviewForm trialId={trial.id} analysisId={analysisId} rowVersion={analysis.row_version} lookNumber={analysis.look_number} reviewVersion={analysis.review_version} signerName={user.name} />
            </div>
          ) : null}
          {hasCommittee ? (
            <p className="text-sm text-stone-600" data-testid="committee-records">
              This trial has a data monitoring committee: its chair records the committee&apos;s recommendation in the closed session of the meeting, after the members have voted.
              {meetings.map(({ meeting: m }) => (
                <Link key={m.id} className="ml-1" href={`/trials/${trial.id}/meetings/${m.id}/closed-session`}>Closed session of the meeting on look {analysis.look_number}.</Link>
              ))}
            </p>
          ) : allows(principal, "recordRecommendation") ? (
            <RecommendationForm trialId={trial.id} analysisId={analysisId} correctsId={current?.id ?? null} signerName={user.name} recordAction={recordRecommendationAction} />
          ) : (
            <p className="text-sm text-stone-600">Only a DMC member records the committee&apos;s recommendation.</p>
          )}
        </Card>

        <Card title="Closed report for the DMC meeting" className="lg:col-span-2">
          <div id="closed-packet" className="flex flex-col gap-4">
            {meetings.length === 0 ? <p className="text-sm text-stone-600">No meeting reviews this look yet. Schedule one on the <Link href={`/trials/${trial.id}/meetings`}>meetings page</Link>.</p> : null}
            {meetings.map(({ meeting: m, closedAgenda, packets }) => (
              <section key={m.id} className="rounded-md border border-stone-200 p-3" data-testid="closed-packet-meeting">
                <h3 className="font-semibold">
                  <Link href={`/trials/${trial.id}/meetings/${m.id}`}>Meeting of {formatMeetingTime(new Date(m.scheduled_at), m.time_zone)}</Link> <Badge tone={m.status === "cancelled" ? "neutral" : "teal"}>{m.status}</Badge>
                </h3>
                <h4 className="mt-2 text-sm font-semibold">Closed session agenda</h4>
                <p className="whitespace-pre-wrap text-sm text-stone-700">{closedAgenda || "None entered."}</p>
                <h4 className="mt-2 text-sm font-semibold">Closed report versions</h4>
                {packets.length === 0 ? <p className="text-sm text-stone-600">Not prepared yet.</p> : null}
                <ul className="flex flex-col gap-1 text-sm" aria-label="Closed report versions">
                  {packets.map((pk) => (
                    <li key={pk.id}>
                      <a href={`/api/trials/${trial.id}/meetings/${m.id}/packets/${pk.id}`} download>Closed report v{pk.version}</a>{" "}
                      <span className="text-stone-500">· {pk.page_count} pages · {new Date(pk.created_at).toISOString().slice(0, 16).replace("T", " ")} UTC · engine {pk.engine_version}</span>
                    </li>
                  ))}
                </ul>
                {prepare && m.status !== "cancelled" ? (
                  <div className="mt-3 max-w-xl">
                    <p className="mb-2 text-xs text-stone-500">Builds the open report followed by the closed results of the locked looks as a PDF, stored as a new version when the content changed. DMC members get a link to it when the packet is sent from the meeting page; it never travels by e-mail. Cairn is decision support: the DMC charter, the protocol and the regulator decide.</p>
                    <ActionButton action={prepareClosedPacketAction} fields={{ trialId: trial.id, analysisId, meetingId: m.id }} label="Prepare the closed packet" pendingLabel="Preparing PDF…" variant="secondary" />
                  </div>
                ) : null}
              </section>
            ))}
          </div>
        </Card>
      </div>
    </div>
  );
}
