"use client";
/**
 * Boundaries and exact operating characteristics of the design being edited, computed on the
 * server (POST .../design-preview) after the inputs have been still for 400 ms. The last good
 * result stays on screen while a new one computes or when a request fails.
 */
import { callApi, jsonInit } from "@/lib/api-client";
import { useEffect, useRef, useState } from "react";
import { SelectInput } from "@/components/ui/field";
import type { ColDef } from "ag-grid-community";
import { CairnPlot, CAIRN_COLOURS } from "@/components/charts/plot";
import { cell, countAxis, densityAxis, probabilityAxis, sampleIndices } from "@/lib/charts/chart-numbers";
import { DataGrid } from "@/components/grid/data-grid";
import { Banner } from "@/components/ui/banner";
import { formatBoundary, formatProbability } from "@/lib/format";
import type { DesignPreview, SingleArmPreview, TwoArmPreview } from "@/lib/design/preview";
import type { Design } from "@/lib/stats/types";

const PREVIEW_DEBOUNCE_MS = 400;

export function usePreview(trialId: number, design: Design | null) {
  const [result, setResult] = useState<{ design: Design; preview: DesignPreview } | null>(null);
  // The inputs the last answer (result or error) was for: until it matches the current inputs, the
  // shown result is the previous design's, and the status must not call it up to date.
  const [answeredKey, setAnsweredKey] = useState<string | null>(null);
  const [computing, setComputing] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const key = design ? JSON.stringify(design) : null;
  const controller = useRef<AbortController | null>(null);
  useEffect(() => {
    if (!key) return;
    const timer = setTimeout(async () => {
      controller.current?.abort();
      const c = new AbortController();
      controller.current = c;
      setComputing(true);
      try {
        const r = await callApi<{ preview: DesignPreview }>(`/api/trials/${trialId}/design-preview`, { ...jsonInit("POST", { spec: JSON.parse(key) }), signal: c.signal });
        if (!r.ok) throw new Error(r.error);
        setResult({ design: JSON.parse(key) as Design, preview: r.data.preview });
        setError(null);
        setAnsweredKey(key);
      } catch (e) {
        if ((e as Error).name === "AbortError") return;
        setError((e as Error).message || "The preview could not be computed.");
        setAnsweredKey(key);
      } finally {
        if (controller.current === c) setComputing(false);
      }
    }, PREVIEW_DEBOUNCE_MS);
    return () => clearTimeout(timer);
  }, [trialId, key]);
  return { result, computing, error, pending: key !== null && answeredKey !== key };
}

function Stat({ label, value, testId, note }: { label: string; value: string; testId: string; note?: string }) {
  return (
    <div className="rounded-md border border-stone-200 bg-stone-50 px-3 py-2">
      <dt className="text-xs text-stone-600">{label}</dt>
      {/* A <dl> group holds only <dt> and <dd>: the note is part of the value. */}
      <dd className="text-xl font-semibold tabular-nums">
        <span data-testid={testId}>{value}</span>
        {note ? <span className="block text-xs font-normal text-stone-600">{note}</span> : null}
      </dd>
    </div>
  );
}

const fmtN = (v: number) => v.toFixed(1);

function OcSummaryBlock({ p, nullLabel, targetLabel, typeILabel, typeINote, extra }: { p: DesignPreview; nullLabel: string; targetLabel: string; typeILabel?: string; typeINote?: string; extra?: React.ReactNode }) {
  return (
    <dl className="grid grid-cols-2 gap-2 sm:grid-cols-3" aria-label="Operating characteristics">
      <Stat label={typeILabel ?? `Type I error (${nullLabel})`} value={formatProbability(p.typeIError)} testId="oc-type-i-error" note={typeINote} />
      {extra}
      <Stat label={`Power (${targetLabel})`} value={formatProbability(p.power)} testId="oc-power" />
      <Stat label={`Early stop for futility (${nullLabel})`} value={formatProbability(p.atNull.pEarlyFutility)} testId="oc-early-futility-null" />
      <Stat label={`Early stop for efficacy (${nullLabel})`} value={formatProbability(p.atNull.pEarlyEfficacy)} testId="oc-early-efficacy-null" />
      <Stat label={`Expected sample size (${nullLabel})`} value={fmtN(p.atNull.expectedSampleSize)} testId="oc-en-null" note={p.arms === "two" ? "per arm" : undefined} />
      <Stat label={`Early stop for futility (${targetLabel})`} value={formatProbability(p.atTarget.pEarlyFutility)} testId="oc-early-futility-target" />
      <Stat label={`Early stop for efficacy (${targetLabel})`} value={formatProbability(p.atTarget.pEarlyEfficacy)} testId="oc-early-efficacy-target" />
      <Stat label={`Expected sample size (${targetLabel})`} value={fmtN(p.atTarget.expectedSampleSize)} testId="oc-en-target" note={p.arms === "two" ? "per arm" : undefined} />
    </dl>
  );
}

/** Long headers wrap onto more lines instead of being cut short; the grid scrolls sideways inside its card. */
const WRAP = { wrapHeaderText: true, autoHeaderHeight: true, minWidth: 150 } as const;

type SingleRow = { look: string; n: number; futility: string; efficacy: string; safety: string };
const SINGLE_COLUMNS: ColDef<SingleRow>[] = [
  { field: "look", headerName: "Look" },
  { ...WRAP, field: "n", headerName: "Patients" },
  { ...WRAP, field: "futility", headerName: "Futility: stop if responders ≤" },
  { ...WRAP, field: "efficacy", headerName: "Efficacy: stop if responders ≥" },
  { ...WRAP, field: "safety", headerName: "Safety: stop if toxicities ≥" },
];

function SingleArmResult({ p, design }: { p: SingleArmPreview; design: Extract<Design, { arms: "single" }> }) {
  const rows: SingleRow[] = p.boundaries.map((b, k) => ({
    look: b.final ? "Final" : String(k + 1),
    n: b.n,
    futility: formatBoundary(b.futilityMax),
    efficacy: formatBoundary(b.efficacyMin),
    safety: design.safety ? formatBoundary(b.toxicityMin) : "—",
  }));
  const xs = p.boundaries.map((b) => b.n);
  const step = { shape: "hv" as const };
  const data: Plotly.Data[] = [
    { x: xs, y: p.boundaries.map((b) => b.futilityMax), name: "Futility boundary (stop at or below)", mode: "lines+markers", line: { color: CAIRN_COLOURS.futility, ...step }, connectgaps: false },
    { x: xs, y: p.boundaries.map((b) => b.efficacyMin), name: "Efficacy boundary (stop at or above; final: success)", mode: "lines+markers", line: { color: CAIRN_COLOURS.efficacy, ...step }, connectgaps: false },
  ];
  // The toxicity boundary counts toxicities, not responders: its own axis on the right.
  if (design.safety) data.push({ x: xs, y: p.boundaries.map((b) => b.toxicityMin), name: "Safety boundary (toxicities, stop at or above; right axis)", mode: "lines+markers", yaxis: "y2", line: { color: CAIRN_COLOURS.safety, dash: "dot", ...step } });
  const maxResp = Math.max(1, ...p.boundaries.map((b) => Math.max(b.futilityMax ?? 0, b.efficacyMin ?? 0)));
  const maxTox = Math.max(1, ...p.boundaries.map((b) => b.toxicityMin ?? 0));
  const final = p.boundaries[p.boundaries.length - 1];
  return (
    <>
      <OcSummaryBlock p={p} nullLabel={`at p0 = ${design.p0}`} targetLabel={`at p1 = ${design.p1}`} />
      <h3 className="mt-2 text-sm font-semibold">Stopping boundaries</h3>
      <DataGrid rows={rows} columns={SINGLE_COLUMNS} label="Stopping boundaries" height={Math.min(360, 60 + rows.length * 42)} csvFileName="cairn-boundaries.csv" />
      <CairnPlot
        title="Stopping boundaries: cumulative responders against evaluable patients"
        summary={`Responder counts that stop the trial at each of ${p.boundaries.length} looks up to ${p.nMax} evaluable patients${final ? `; at the final analysis, success needs at least ${formatBoundary(final.efficacyMin)} responders` : ""}.${design.safety ? " The safety boundary counts toxicities, on the right-hand axis." : ""}`}
        numbers={{ columns: ["Look", "Evaluable patients", "Futility: stop if responders ≤", "Efficacy: stop if responders ≥", ...(design.safety ? ["Safety: stop if toxicities ≥"] : [])], rows: rows.map((r) => [r.look, r.n, r.futility, r.efficacy, ...(design.safety ? [r.safety] : [])]) }}
        data={data}
        layout={{
          xaxis: countAxis("Evaluable patients (count)", p.nMax, { range: [0, p.nMax + 1] }),
          yaxis: countAxis("Cumulative responders (count)", maxResp),
          ...(design.safety ? { yaxis2: countAxis("Cumulative toxicities (count)", maxTox, { overlaying: "y", side: "right", showgrid: false }), margin: { l: 64, r: 64, t: 16, b: 56 } } : {}),
        }}
        fileName="cairn-boundaries"
      />
      <OcCurve p={p} xLabel="True response rate" marks={[design.p0, design.p1]} />
      <SafetyOcTable p={p} nullLabel={`p0 = ${design.p0}`} targetLabel={`p1 = ${design.p1}`} />
    </>
  );
}

type TwoRow = { look: string; n: number; xC: number; futility: string; efficacy: string };
const TWO_COLUMNS: ColDef<TwoRow>[] = [
  { field: "look", headerName: "Look" },
  { ...WRAP, field: "n", headerName: "Patients per arm" },
  { ...WRAP, field: "xC", headerName: "Control responders" },
  { ...WRAP, field: "futility", headerName: "Futility: stop if experimental responders ≤" },
  { ...WRAP, field: "efficacy", headerName: "Efficacy: stop if experimental responders ≥" },
];

function TwoArmResult({ p, design }: { p: TwoArmPreview; design: Extract<Design, { arms: "two" }> }) {
  const lookIndex = new Map(p.looks.map((n, k) => [n, k]));
  const rows: TwoRow[] = p.boundaries.map((b) => ({
    look: b.final ? "Final" : String((lookIndex.get(b.n) ?? 0) + 1),
    n: b.n,
    xC: b.xC,
    futility: formatBoundary(b.futilityMaxT),
    efficacy: formatBoundary(b.efficacyMinT),
  }));
  // One look at a time by default: every look's two step lines overlaid do not read.
  const [chartLook, setChartLook] = useState<number | "all">(p.looks[0]);
  const data: Plotly.Data[] = p.looks.flatMap((n, k) => {
    if (chartLook !== "all" && chartLook !== n) return [];
    const own = p.boundaries.filter((b) => b.n === n);
    const final = k === p.looks.length - 1;
    const label = final ? `final (${n}/arm)` : `look ${k + 1} (${n}/arm)`;
    return [
      { x: own.map((b) => b.xC), y: own.map((b) => b.futilityMaxT), name: `Futility, ${label}`, mode: "lines" as const, line: { color: CAIRN_COLOURS.futility, shape: "hv" as const, width: 1 + k }, opacity: 0.5 + (0.5 * (k + 1)) / p.looks.length },
      { x: own.map((b) => b.xC), y: own.map((b) => b.efficacyMinT), name: `Efficacy, ${label}`, mode: "lines" as const, line: { color: CAIRN_COLOURS.efficacy, shape: "hv" as const, width: 1 + k }, opacity: 0.5 + (0.5 * (k + 1)) / p.looks.length },
    ];
  });
  return (
    <>
      <OcSummaryBlock
        p={p}
        typeILabel={`Type I error at ${nullBoundaryText(p.delta)}, maximum over control rates from ${p.controlRateRange.from} to ${p.controlRateRange.to} (every ${p.controlRateStep}, plus the assumed rate)`}
        typeINote={`largest at pC = ${p.typeIErrorMaxAt.controlRate}, pT = ${p.typeIErrorMaxAt.experimentalRate}`}
        extra={
          <Stat
            label={`Type I error at the assumed control rate (pC = ${design.controlRate}, pT = ${p.typeIErrorAtControlRate === null ? "outside 0–1" : p.nullPoint.experimentalRate})`}
            value={p.typeIErrorAtControlRate === null ? "—" : formatProbability(p.typeIErrorAtControlRate)}
            testId="oc-type-i-error-at-control"
          />
        }
        nullLabel={`on the null boundary at pC = ${p.nullPoint.controlRate}, pT = ${p.nullPoint.experimentalRate}`}
        targetLabel={`pT = ${design.experimentalRate}, pC = ${design.controlRate}`}
      />
      <NullBoundaryCurve p={p} />
      <h3 className="mt-2 text-sm font-semibold">Stopping boundaries (per look, given the control arm&apos;s responders)</h3>
      <DataGrid rows={rows} columns={TWO_COLUMNS} label="Stopping boundaries" height={320} csvFileName="cairn-boundaries-two-arm.csv" />
      {p.safety ? (
        <p className="text-xs text-stone-600">
          Safety (experimental arm): stop if toxicities ≥ {p.safety.map((s) => `${formatBoundary(s.toxicityMin)} of ${s.n}`).join("; ")}.
        </p>
      ) : null}
      <label className="flex items-center gap-2 text-sm">
        <span>Boundary chart for</span>
        <SelectInput className="w-56" value={String(chartLook)} onChange={(e) => setChartLook(e.target.value === "all" ? "all" : Number(e.target.value))} aria-label="Look shown in the boundary chart">
          {p.looks.map((n, k) => (
            <option key={n} value={n}>
              {k === p.looks.length - 1 ? `Final analysis (${n} per arm)` : `Look ${k + 1} (${n} per arm)`}
            </option>
          ))}
          <option value="all">All looks together</option>
        </SelectInput>
      </label>
      <CairnPlot
        title={`Experimental responders that stop, against control responders, ${chartLook === "all" ? "by look" : `at ${chartLook} per arm`}`}
        summary={`For each of ${p.looks.length} looks (${p.looks.join(", ")} evaluable patients per arm), the experimental responder counts that stop for futility (at or below) or efficacy (at or above), given the control arm's responders.`}
        numbers={{ columns: ["Look", "Evaluable patients per arm", "Control responders", "Futility: stop if experimental responders ≤", "Efficacy: stop if experimental responders ≥"], rows: rows.map((r) => [r.look, r.n, r.xC, r.futility, r.efficacy]) }}
        data={data}
        layout={{ xaxis: countAxis("Control responders (count)", Math.max(1, ...p.looks)), yaxis: countAxis("Experimental responders (count)", Math.max(1, ...p.looks)) }}
        fileName="cairn-boundaries-two-arm"
      />
      <OcCurve p={p} xLabel={`True experimental rate (control at ${design.controlRate})`} marks={[design.controlRate, design.experimentalRate]} />
      <SafetyOcTable p={p} nullLabel={`both at ${design.controlRate}`} targetLabel={`${design.experimentalRate} vs ${design.controlRate}`} />
    </>
  );
}

type SafetyRow = { q: string; safetyNull: string; futilityNull: string; efficacyNull: string; successNull: string; enNull: string; safetyTarget: string; successTarget: string; enTarget: string };

/** Joint response-and-safety characteristics over true toxicity rates, with the assumption they rest on. */
function SafetyOcTable({ p, nullLabel, targetLabel }: { p: DesignPreview; nullLabel: string; targetLabel: string }) {
  if (!p.safetyGrid) return null;
  const rows: SafetyRow[] = p.safetyGrid.map((r) => ({
    q: `${(r.q * 100).toFixed(1)}%`,
    safetyNull: formatProbability(r.atNull.pSafetyStop),
    futilityNull: formatProbability(r.atNull.pEarlyFutility),
    efficacyNull: formatProbability(r.atNull.pEarlyEfficacy),
    successNull: formatProbability(r.atNull.pDeclareSuccess),
    enNull: fmtN(r.atNull.expectedSampleSize),
    safetyTarget: formatProbability(r.atTarget.pSafetyStop),
    successTarget: formatProbability(r.atTarget.pDeclareSuccess),
    enTarget: fmtN(r.atTarget.expectedSampleSize),
  }));
  const columns: ColDef<SafetyRow>[] = [
    { ...WRAP, field: "q", headerName: "True toxicity rate" },
    { ...WRAP, field: "safetyNull", headerName: `Safety stop (${nullLabel})` },
    { ...WRAP, field: "futilityNull", headerName: `Early futility stop (${nullLabel})` },
    { ...WRAP, field: "efficacyNull", headerName: `Early efficacy stop (${nullLabel})` },
    { ...WRAP, field: "successNull", headerName: `Efficacy declared (${nullLabel})` },
    { ...WRAP, field: "enNull", headerName: `Average patients (${nullLabel})` },
    { ...WRAP, field: "safetyTarget", headerName: `Safety stop (${targetLabel})` },
    { ...WRAP, field: "successTarget", headerName: `Efficacy declared (${targetLabel})` },
    { ...WRAP, field: "enTarget", headerName: `Average patients (${targetLabel})` },
  ];
  return (
    <>
      <h3 className="mt-2 text-sm font-semibold">With the safety rule, over true toxicity rates</h3>
      <p className="text-xs text-stone-600" data-testid="safety-oc-assumption">
        Computed exactly on the assumption that each patient&apos;s response and toxicity are independent. If they are related in this
        disease or drug, these numbers are off; treat them as a guide for the DMC, whose charter and protocol decide.
      </p>
      <DataGrid rows={rows} columns={columns} label="Operating characteristics with the safety rule" height={Math.min(420, 60 + rows.length * 42)} csvFileName="cairn-safety-characteristics.csv" />
    </>
  );
}

/** The null hypothesis boundary in words: pT = pC + δ with δ's value (δ = 0 reads pT = pC). */
function nullBoundaryText(delta: number): string {
  return delta === 0 ? "pT = pC (δ = 0)" : `pT = pC + δ (δ = ${delta})`;
}

/** Type I error along the null boundary pT = pC + δ against the control rate: where the maximum sits. */
function NullBoundaryCurve({ p }: { p: TwoArmPreview }) {
  return (
    <CairnPlot
      title={`Type I error along the null boundary ${nullBoundaryText(p.delta)}, by control rate`}
      summary={`Largest type I error ${formatProbability(p.typeIError)} at control rate ${p.typeIErrorMaxAt.controlRate}, over ${p.nullCurve.length} control rates.`}
      numbers={{ columns: ["Control rate pC", "Type I error"], rows: p.nullCurve.map((c) => [c.controlRate, cell(c.typeIError)]) }}
      height={240}
      data={[
        { x: p.nullCurve.map((c) => c.controlRate), y: p.nullCurve.map((c) => c.typeIError), name: "Type I error", mode: "lines+markers", line: { color: CAIRN_COLOURS.efficacy } },
      ]}
      layout={{ showlegend: false, xaxis: probabilityAxis("True control rate pC (proportion; experimental pT = pC + δ)"), yaxis: { title: { text: "P(declare success) (probability)" }, rangemode: "tozero", automargin: true } }}
      fileName="cairn-type-i-error-null-boundary"
    />
  );
}

function OcCurve({ p, xLabel, marks }: { p: DesignPreview; xLabel: string; marks: number[] }) {
  const x = p.curve.map((c) => c.rate);
  const perArm = p.arms === "two" ? " per arm" : "";
  return (
    <CairnPlot
      title="P(declare success) and expected sample size over true rates"
      summary={`At the marked rates (${marks.join(" and ")}): type I error ${formatProbability(p.typeIError)}, power ${formatProbability(p.power)}; expected sample size${perArm} ${fmtN(p.atNull.expectedSampleSize)} and ${fmtN(p.atTarget.expectedSampleSize)}.`}
      numbers={{
        columns: ["True rate", "P(declare success)", "P(early stop for futility)", "P(early stop for efficacy)", `Expected sample size${perArm}`],
        rows: sampleIndices(x, 0.05).map((i) => [x[i].toFixed(2), cell(p.curve[i].pDeclareSuccess), cell(p.curve[i].pEarlyFutility), cell(p.curve[i].pEarlyEfficacy), cell(p.curve[i].expectedSampleSize, 1)]),
        note: "Every 0.05 of the rate; the chart draws the full grid.",
      }}
      data={[
        { x, y: p.curve.map((c) => c.pDeclareSuccess), name: "P(declare success)", mode: "lines", line: { color: CAIRN_COLOURS.efficacy } },
        { x, y: p.curve.map((c) => c.pEarlyFutility), name: "P(early stop for futility)", mode: "lines", line: { color: CAIRN_COLOURS.futility, dash: "dash" } },
        { x, y: p.curve.map((c) => c.pEarlyEfficacy), name: "P(early stop for efficacy)", mode: "lines", line: { color: CAIRN_COLOURS.efficacy, dash: "dash" } },
        { x, y: p.curve.map((c) => c.expectedSampleSize), name: "Expected sample size", mode: "lines", yaxis: "y2", line: { color: CAIRN_COLOURS.control, dash: "dot" } },
      ]}
      layout={{
        xaxis: probabilityAxis(`${xLabel} (proportion)`),
        yaxis: probabilityAxis("Probability (0 to 1)", {}, 0, 1, 0.2),
        yaxis2: countAxis(`Expected sample size${perArm} (patients)`, Math.max(1, ...p.curve.map((c) => c.expectedSampleSize)), { overlaying: "y", side: "right", showgrid: false }),
        margin: { l: 64, r: 64, t: 16, b: 56 },
        shapes: marks.map((m) => ({ type: "line", x0: m, x1: m, y0: 0, y1: 1, yref: "paper", line: { color: "#bbb", width: 1, dash: "dot" } })),
      }}
      fileName="cairn-operating-characteristics"
    />
  );
}

function PriorDensities({ p }: { p: DesignPreview }) {
  return (
    <div className="grid gap-2 sm:grid-cols-2">
      {p.priors.map((pr) => (
        <div key={pr.label} className="rounded-md border border-stone-200 p-2">
          <p className="text-sm font-medium">{pr.label}</p>
          <p className="text-xs text-stone-600">
            Mean {pr.mean.toFixed(3)} · effective sample size (Morita, Thall &amp; Mueller 2008) <span data-testid="prior-ess" className="tabular-nums">{pr.ess.toFixed(1)}</span>
          </p>
          <CairnPlot
            title={`Prior density: ${pr.label}`}
            summary={`Prior mean ${pr.mean.toFixed(3)}, effective sample size ${pr.ess.toFixed(1)} patients.`}
            numbers={{ columns: ["Rate", "Prior density"], rows: sampleIndices(pr.density.x, 0.05).map((i) => [pr.density.x[i].toFixed(2), cell(pr.density.y[i])]), note: "Every 0.05 of the rate; the chart draws the full grid." }}
            height={220}
            data={[{ x: pr.density.x, y: pr.density.y, mode: "lines", line: { color: CAIRN_COLOURS.prior }, fill: "tozeroy", name: "density" }]}
            layout={{ showlegend: false, margin: { l: 56, r: 8, t: 8, b: 48 }, xaxis: probabilityAxis("Rate (proportion, 0 to 1)", {}, 0, 1, 0.2), yaxis: densityAxis("Density", { range: [0, Math.min(12, Math.max(...pr.density.y) * 1.05)] }) }}
            fileName="cairn-prior"
          />
        </div>
      ))}
    </div>
  );
}

/** Shows the last result with the design it was computed for (labels and numbers always agree). */
export function PreviewPanel({ preview, invalid }: { preview: ReturnType<typeof usePreview>; invalid: boolean }) {
  const { result, computing, error, pending } = preview;
  const shown = result?.preview ?? null;
  const design = result?.design ?? null;
  return (
    <section aria-label="Boundaries and operating characteristics" aria-busy={computing} className="flex flex-col gap-3">
      <div className="flex items-center justify-between">
        <h2 className="text-lg font-semibold">Boundaries and operating characteristics</h2>
        <span role="status" aria-live="polite" className="text-xs text-stone-500" data-testid="preview-status">
          {computing ? "computing…" : invalid ? "waiting for valid inputs" : pending ? "updating…" : shown ? "up to date" : ""}
        </span>
      </div>
      <p className="text-xs text-stone-500">Exact: forward recursion over the binomial outcomes between looks (no simulation). Rounded on screen; the CSV and API carry full precision.</p>
      {invalid ? <Banner tone="warning">Fix the highlighted fields to update these results{shown ? "; the last valid design's results are shown." : "."}</Banner> : null}
      {error ? <Banner tone="danger" title="The preview could not be updated">{error}{shown ? " The last results are kept below." : ""}</Banner> : null}
      {!shown ? (
        <p className="text-sm text-stone-600">{computing ? "Computing the first results…" : "Results appear here as soon as the design is valid."}</p>
      ) : (
        <div className={`flex flex-col gap-3 transition-opacity ${computing ? "opacity-60" : ""}`}>
          {shown.arms === "single" && design?.arms === "single" ? <SingleArmResult p={shown} design={design} /> : null}
          {shown.arms === "two" && design?.arms === "two" ? <TwoArmResult p={shown} design={design} /> : null}
          <h3 className="text-sm font-semibold">Priors</h3>
          <PriorDensities p={shown} />
        </div>
      )}
    </section>
  );
}
