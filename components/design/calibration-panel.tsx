"use client";
/**
 * Threshold search, one arm or two: search the final success bar, the interim futility floor and
 * (with early stopping for success) the early-success bar for designs meeting a type I error limit
 * and a power target with the fewest average patients at the null. The search runs on the server
 * as a job (POST .../calibrations); this panel polls its progress and can cancel it.
 *
 * Layout: the cloud of searched designs (type I error against power, with the limit and target
 * drawn in) comes first, because the trade-off is what the statistician reads; the table of the best
 * designs, grouped where several threshold sets give the same operating characteristics, follows.
 * Words come from lib/design/threshold-labels.ts; the papers' symbols are small secondary notation.
 */
import { callApi, jsonInit } from "@/lib/api-client";
import { useEffect, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { Field, TextInput } from "@/components/ui/field";
import { CairnPlot, CAIRN_COLOURS } from "@/components/charts/plot";
import { formatProbability } from "@/lib/format";
import { issuesToFieldErrors, num } from "@/lib/design/form-model";
import { SEARCH_WORDS, thresholdWord, type ThresholdKey } from "@/lib/design/threshold-labels";
import { groupByCharacteristics, type ThresholdSet } from "@/lib/design/calibration-groups";
import type { CalibrationJobJson } from "@/lib/jobs/calibration-job-json";
import type { CalibratedDesign } from "@/lib/stats/calibration";
import type { Design } from "@/lib/stats/types";

type RangeText = { from: string; to: string; step: string };
const POLL_MS = 500;
/** The searches keep this many best designs; grouping equal ones leaves fewer rows. */
const KEEP = 30;

function Notation({ children }: { children: string }) {
  return <span className="ml-1 text-xs font-normal text-stone-500">{children}</span>;
}

function RangeInputs({ id, thresholdKey, rule, value, onChange, errors }: { id: string; thresholdKey: ThresholdKey; rule: "predictive" | "posterior"; value: RangeText; onChange: (v: RangeText) => void; errors: Record<string, string> }) {
  const w = thresholdWord(thresholdKey, rule);
  return (
    <fieldset className="grid grid-cols-3 gap-2">
      <legend className="col-span-3 text-sm font-medium text-stone-700" title={w.explain}>
        {w.word}
        <Notation>{w.symbol}</Notation> <span className="font-normal text-stone-600">{SEARCH_WORDS.range}</span>
      </legend>
      {(["from", "to", "step"] as const).map((k) => (
        <Field key={k} label={`${w.word}: ${k}`} name={`${id}-${k}`} error={errors[`${id}.${k}`]}>
          <TextInput id={`${id}-${k}`} name={`${id}-${k}`} inputMode="decimal" value={value[k]} onChange={(e) => onChange({ ...value, [k]: e.target.value })} autoComplete="off" />
        </Field>
      ))}
    </fieldset>
  );
}

function statusText(job: CalibrationJobJson): string {
  switch (job.status) {
    case "running":
      return "Searching…";
    case "cancelling":
      return "Stopping…";
    case "cancelled":
      return `Stopped early: results among the ${job.evaluated} designs evaluated so far.`;
    case "failed":
      return "The search failed.";
    default:
      return "Search complete.";
  }
}

/** What "the null" and "the alternative" are for this design, in words. */
function scenarioWords(design: Design): { nullPoint: string; perArm: string; typeIErrorNote: string } {
  if (design.arms === "two")
    return {
      nullPoint: `at the null (control ${design.controlRate}, experimental ${Math.round((design.controlRate + design.delta) * 1e12) / 1e12})`,
      perArm: " per arm",
      typeIErrorNote: `Type I error is the largest over control rates on the null boundary (experimental = control ${design.delta >= 0 ? "+" : "−"} ${Math.abs(design.delta)}); power is at experimental ${design.experimentalRate} against control ${design.controlRate}.`,
    };
  return { nullPoint: `at the null (rate ${design.p0})`, perArm: "", typeIErrorNote: `Type I error is at the null rate ${design.p0}; power is at ${design.p1}.` };
}

function thresholdSetText(t: ThresholdSet, rule: "predictive" | "posterior"): string {
  const parts = [`${thresholdWord("thetaT").word} ${t.thetaT}`, `${thresholdWord("futilityThreshold", rule).word} ${t.thetaL}`];
  if (t.thetaU !== null) parts.push(`${thresholdWord("efficacyThreshold", rule).word} ${t.thetaU}`);
  return parts.join(", ");
}

function ResultsChart({ job, limit, target, twoArms }: { job: CalibrationJobJson; limit: number; target: number; twoArms: boolean }) {
  const feasible = job.points.filter(([t, p]) => t <= limit && p >= target);
  const other = job.points.filter(([t, p]) => !(t <= limit && p >= target));
  const best = job.best;
  const xMax = Math.min(1, Math.max(limit * 2, ...job.points.map(([t]) => t), 0.05));
  return (
    <div>
      <h3 className="text-sm font-semibold">{SEARCH_WORDS.cloudTitle}</h3>
      <CairnPlot
        title={SEARCH_WORDS.cloudTitle}
        fileName="cairn-threshold-search"
        height={340}
        data={[
          { type: "scatter", mode: "markers", name: "Misses a target", x: other.map((p) => p[0]), y: other.map((p) => p[1]), marker: { color: CAIRN_COLOURS.prior, size: 5, opacity: 0.6 }, hovertemplate: "type I error %{x:.4f}<br>power %{y:.4f}<extra></extra>" },
          { type: "scatter", mode: "markers", name: "Meets both targets", x: feasible.map((p) => p[0]), y: feasible.map((p) => p[1]), marker: { color: CAIRN_COLOURS.efficacy, size: 6 }, hovertemplate: "type I error %{x:.4f}<br>power %{y:.4f}<extra></extra>" },
          {
            type: "scatter",
            mode: "markers",
            name: "Fewest average patients",
            x: best.map((b) => b.typeIError),
            y: best.map((b) => b.power),
            marker: { color: CAIRN_COLOURS.observed, size: 10, symbol: "diamond-open", line: { width: 2 } },
            hovertemplate: "type I error %{x:.4f}<br>power %{y:.4f}<extra>best</extra>",
          },
        ]}
        layout={{
          xaxis: { title: { text: twoArms ? "Type I error, largest on the null boundary (probability, 0 to 1)" : "Type I error at the null rate (probability, 0 to 1)" }, range: [0, xMax], zeroline: false },
          yaxis: { title: { text: "Power at the alternative (probability, 0 to 1)" }, range: [0, 1.02] },
          shapes: [
            { type: "rect", x0: 0, x1: limit, y0: target, y1: 1.02, fillcolor: CAIRN_COLOURS.efficacy, opacity: 0.08, line: { width: 0 } },
            { type: "line", x0: limit, x1: limit, y0: 0, y1: 1.02, line: { color: CAIRN_COLOURS.futility, dash: "dash", width: 1 } },
            { type: "line", x0: 0, x1: xMax, y0: target, y1: target, line: { color: CAIRN_COLOURS.futility, dash: "dash", width: 1 } },
          ],
          annotations: [
            { x: limit, y: 0.04, text: `limit ${limit}`, showarrow: false, xanchor: "left", font: { size: 11, color: CAIRN_COLOURS.futility } },
            { x: xMax, y: target, text: `target ${target}`, showarrow: false, xanchor: "right", yanchor: "bottom", font: { size: 11, color: CAIRN_COLOURS.futility } },
          ],
        }}
      />
      <p className="text-xs text-stone-600" data-testid="calibration-chart-caption">
        {job.points.length} distinct results plotted from {job.evaluated} threshold sets; the shaded corner meets both targets.
      </p>
    </div>
  );
}

export function CalibrationPanel({ trialId, design, onUse }: { trialId: number; design: Design | null; onUse: (d: CalibratedDesign) => void }) {
  const [limit, setLimit] = useState("0.1");
  const [target, setTarget] = useState("0.8");
  const [thetaT, setThetaT] = useState<RangeText>({ from: "0.8", to: "0.99", step: "0.01" });
  const [thetaL, setThetaL] = useState<RangeText>({ from: "0", to: "0.2", step: "0.01" });
  const [thetaU, setThetaU] = useState<RangeText>({ from: "0.95", to: "0.999", step: "0.01" });
  const [job, setJob] = useState<CalibrationJobJson | null>(null);
  // The limit and target the shown job was run with (the inputs may change while it runs).
  const [ran, setRan] = useState<{ limit: number; target: number } | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);

  useEffect(
    () => () => {
      if (timer.current) clearTimeout(timer.current);
    },
    [],
  );

  if (!design) return <p className="text-sm text-stone-600">The threshold search needs a valid design: fix the highlighted fields first.</p>;

  const rule = design.rule.kind === "predictive" ? "predictive" : "posterior";
  const running = job?.status === "running" || job?.status === "cancelling";
  const range = (r: RangeText) => ({ from: num(r.from), to: num(r.to), step: num(r.step) });
  const words = scenarioWords(design);

  async function poll(id: string) {
    try {
      const r = await callApi<{ job: CalibrationJobJson }>(`/api/trials/${trialId}/calibrations/${id}`, {});
      if (!r.ok) throw new Error(r.error);
      setJob(r.data.job);
      if (r.data.job.status === "running" || r.data.job.status === "cancelling") timer.current = setTimeout(() => poll(id), POLL_MS);
    } catch (e) {
      setError((e as Error).message);
    }
  }

  async function start() {
    setError(null);
    setErrors({});
    if (timer.current) clearTimeout(timer.current);
    const r = await callApi<{ job: CalibrationJobJson }>(
      `/api/trials/${trialId}/calibrations`,
      jsonInit("POST", { spec: design, typeIErrorLimit: num(limit), powerTarget: num(target), thetaT: range(thetaT), thetaL: range(thetaL), thetaU: design?.rule.efficacyStopping ? range(thetaU) : null, keep: KEEP }),
    );
    if (!r.ok) {
      setError(r.error);
      const specIssues = r.pathIssues.filter((i) => i.path.startsWith("spec.")).map((i) => ({ ...i, path: i.path.slice(5) }));
      if (r.pathIssues.length) setErrors({ ...r.fieldErrors, ...issuesToFieldErrors(specIssues) });
      return;
    }
    setRan({ limit: num(limit), target: num(target) });
    setJob(r.data.job);
    timer.current = setTimeout(() => poll(r.data.job.id), POLL_MS);
  }

  async function cancel() {
    if (!job) return;
    const r = await callApi<{ job: CalibrationJobJson }>(`/api/trials/${trialId}/calibrations/${job.id}`, { method: "DELETE" });
    if (r.ok) setJob(r.data.job);
    else setError(r.error);
  }

  const groups = job ? groupByCharacteristics(job.best) : [];
  const finished = job && !running;

  return (
    <section className="flex flex-col gap-3" aria-label={SEARCH_WORDS.search}>
      <p className="text-xs text-stone-600">
        Keeps the priors, rates, looks and rule of the form and tries every combination of the bars below, listing the designs whose type I error is at most the limit and whose power is at least the target, fewest average patients {words.nullPoint} first. {words.typeIErrorNote}
      </p>
      <p className="text-xs text-stone-600">
        This is decision support for choosing a design: the thresholds the trial uses are the ones written into the protocol and the committee&apos;s charter, as agreed with the regulator.
      </p>
      <div className="grid grid-cols-2 gap-3">
        <Field label={SEARCH_WORDS.typeIErrorLimit} name="cal-limit" error={errors.typeIErrorLimit}>
          <TextInput id="cal-limit" name="cal-limit" inputMode="decimal" value={limit} onChange={(e) => setLimit(e.target.value)} />
        </Field>
        <Field label={SEARCH_WORDS.powerTarget} name="cal-target" error={errors.powerTarget}>
          <TextInput id="cal-target" name="cal-target" inputMode="decimal" value={target} onChange={(e) => setTarget(e.target.value)} />
        </Field>
      </div>
      <RangeInputs id="thetaT" thresholdKey="thetaT" rule={rule} value={thetaT} onChange={setThetaT} errors={errors} />
      <RangeInputs id="thetaL" thresholdKey="futilityThreshold" rule={rule} value={thetaL} onChange={setThetaL} errors={errors} />
      {design.rule.efficacyStopping ? <RangeInputs id="thetaU" thresholdKey="efficacyThreshold" rule={rule} value={thetaU} onChange={setThetaU} errors={errors} /> : null}
      <div className="flex gap-2">
        <Button type="button" onClick={start} disabled={running}>
          {SEARCH_WORDS.run}
        </Button>
        {running ? (
          <Button type="button" variant="secondary" onClick={cancel} disabled={job?.status === "cancelling"}>
            Stop the search
          </Button>
        ) : null}
      </div>
      {error ? <Banner tone="danger">{error}</Banner> : null}
      {job ? (
        <div className="flex flex-col gap-3">
          <div role="status" className="flex flex-col gap-1">
            <label htmlFor="cal-progress" className="text-sm">
              {statusText(job)}{" "}
              <span className="tabular-nums text-stone-600">
                {Math.round(job.progress * 100)}% · {job.evaluated} of {job.total} threshold sets evaluated · {job.feasible} meet both targets
              </span>
            </label>
            <progress id="cal-progress" max={1} value={job.progress} className="h-2 w-full accent-lichen-600" data-testid="calibration-progress" />
          </div>
          {job.error ? <Banner tone="danger">{job.error}</Banner> : null}
          {job.points.length > 0 && ran ? <ResultsChart job={job} limit={ran.limit} target={ran.target} twoArms={design.arms === "two"} /> : null}
          {finished && job.best.length === 0 ? (
            <p className="text-sm text-stone-600" data-testid="calibration-none">
              {job.status === "cancelled" ? "No design among those evaluated so far meets both targets. Run the search to the end, or widen it." : "No design on this grid meets both targets. Widen the ranges, raise the sample size, or relax a target."}
            </p>
          ) : null}
          {groups.length > 0 ? (
            <div className="overflow-x-auto">
              <h3 className="text-sm font-semibold">{SEARCH_WORDS.bestDesigns}</h3>
              <p className="text-xs text-stone-600">Threshold sets with identical operating characteristics share a row.</p>
              <table className="w-full text-sm" aria-label={SEARCH_WORDS.bestDesigns}>
                <thead>
                  <tr className="text-left align-bottom text-xs text-stone-600">
                    <th className="py-1">
                      Thresholds ({thresholdWord("thetaT").word}
                      <Notation>{thresholdWord("thetaT").symbol}</Notation> / {thresholdWord("futilityThreshold", rule).word}
                      <Notation>{thresholdWord("futilityThreshold", rule).symbol}</Notation>
                      {design.rule.efficacyStopping ? (
                        <>
                          {" "}
                          / {thresholdWord("efficacyThreshold", rule).word}
                          <Notation>{thresholdWord("efficacyThreshold", rule).symbol}</Notation>
                        </>
                      ) : null}
                      )
                    </th>
                    <th>{SEARCH_WORDS.typeIError}</th>
                    <th>{SEARCH_WORDS.power}</th>
                    <th>
                      {SEARCH_WORDS.averagePatients}
                      {words.perArm} {words.nullPoint}
                    </th>
                    <th>
                      {SEARCH_WORDS.stopEarly} {words.nullPoint}
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {groups.map((g, i) => (
                    <tr key={i} className="border-t border-stone-100 align-top tabular-nums" data-testid="calibration-result">
                      <td className="py-1">
                        <ul className="flex flex-col gap-1">
                          {g.thresholds.map((t, j) => (
                            <li key={j} className="flex flex-wrap items-center gap-2">
                              <span>
                                {t.thetaT} / {t.thetaL}
                                {t.thetaU !== null ? ` / ${t.thetaU}` : ""}
                              </span>
                              <Button type="button" variant="quiet" onClick={() => onUse({ ...g.design, ...t })} aria-label={`${SEARCH_WORDS.useDesign}: ${thresholdSetText(t, rule)}`}>
                                {SEARCH_WORDS.useDesign}
                              </Button>
                            </li>
                          ))}
                        </ul>
                      </td>
                      <td>{formatProbability(g.design.typeIError)}</td>
                      <td>{formatProbability(g.design.power)}</td>
                      <td>{g.design.expectedSampleSizeNull.toFixed(1)}</td>
                      <td>
                        {formatProbability(g.design.pEarlyTerminationNull)}
                        {/* Jobs stored before the split carry only the total. */}
                        {typeof g.design.pEarlyFutilityNull === "number" && typeof g.design.pEarlyEfficacyNull === "number" ? (
                          <span className="block text-xs text-stone-500">
                            futility {formatProbability(g.design.pEarlyFutilityNull)} · early success {formatProbability(g.design.pEarlyEfficacyNull)}
                          </span>
                        ) : null}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          ) : null}
        </div>
      ) : null}
    </section>
  );
}
