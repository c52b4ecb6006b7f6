"use client";
/**
 * CLOSED: "what if?" The reviewer supposes how many more patients become evaluable and how many of
 * them respond (or picks a rate for them), and reads the rule's verdict at those counts from the
 * read-only what-if route as they type (debounced, earlier requests cancelled). Nothing is saved.
 * The boundary chart shows the observed path and the hypothetical one dashed.
 */
import { useEffect, useRef, useState } from "react";
import { CairnPlot, CAIRN_COLOURS } from "@/components/charts/plot";
import { Button } from "@/components/ui/button";
import { Field, TextInput } from "@/components/ui/field";
import { formatBoundary, formatProbability } from "@/lib/format";
import type { BoundaryRow, Review } from "@/lib/review/compute-review";
import type { CountsNow, WhatIfAnswer } from "@/lib/review/what-if";

type WhatIfRates = { arms: "single"; p0: number; p1: number } | { arms: "two"; controlRate: number; experimentalRate: number };

type State = { state: "idle" | "loading" } | { state: "answer"; answer: WhatIfAnswer } | { state: "error"; message: string };

const rounded = (rate: number, k: number) => Math.min(k, Math.max(0, Math.round(rate * k)));

export function WhatIf({
  trialId,
  analysisId,
  now,
  rates,
  maxN,
  nextAhead,
  boundaries,
  observedPath,
}: {
  trialId: number;
  analysisId: number;
  now: CountsNow;
  rates: WhatIfRates;
  /** nMax (per arm). */
  maxN: number;
  /** Patients to the next planned look, per arm (experimental, control for two arms). */
  nextAhead: { single: number } | { experimental: number; control: number };
  boundaries: BoundaryRow[];
  observedPath: Review["observedPath"];
}) {
  const single = now.arms === "single";
  const armT = now.arms === "single" ? now.single : now.experimental;
  const armC = now.arms === "two" ? now.control : null;
  const kT0 = "single" in nextAhead ? nextAhead.single : nextAhead.experimental;
  const kC0 = "control" in nextAhead ? nextAhead.control : 0;
  const observedRate = (a: { responders: number; evaluable: number }, fallback: number) => (a.evaluable > 0 ? a.responders / a.evaluable : fallback);
  const rateT0 = observedRate(armT, rates.arms === "single" ? rates.p0 : rates.experimentalRate);
  const rateC0 = armC ? observedRate(armC, rates.arms === "two" ? rates.controlRate : 0) : 0;
  const [patientsT, setPatientsT] = useState(String(kT0));
  const [respondersT, setRespondersT] = useState(String(rounded(rateT0, kT0)));
  const [patientsC, setPatientsC] = useState(String(kC0));
  const [respondersC, setRespondersC] = useState(String(rounded(rateC0, kC0)));
  const [result, setResult] = useState<State>({ state: "idle" });
  const controller = useRef<AbortController | null>(null);

  const empty = [patientsT, respondersT, ...(single ? [] : [patientsC, respondersC])].some((v) => v.trim() === "");
  const query = single
    ? `patients=${encodeURIComponent(patientsT.trim())}&responders=${encodeURIComponent(respondersT.trim())}`
    : `patientsT=${encodeURIComponent(patientsT.trim())}&respondersT=${encodeURIComponent(respondersT.trim())}&patientsC=${encodeURIComponent(patientsC.trim())}&respondersC=${encodeURIComponent(respondersC.trim())}`;

  useEffect(() => {
    if (empty) return;
    const timer = setTimeout(async () => {
      controller.current?.abort();
      const c = new AbortController();
      controller.current = c;
      setResult({ state: "loading" });
      try {
        const res = await fetch(`/api/trials/${trialId}/analyses/${analysisId}/what-if?${query}`, { signal: c.signal, cache: "no-store" });
        const body = await res.json();
        if (!res.ok) setResult({ state: "error", message: body.issues?.[0]?.message ?? body.error ?? "The answer could not be computed." });
        else setResult({ state: "answer", answer: body as WhatIfAnswer });
      } catch (e) {
        if ((e as Error).name !== "AbortError") setResult({ state: "error", message: "The server could not be reached; try again." });
      }
    }, 250);
    return () => clearTimeout(timer);
  }, [query, empty, trialId, analysisId]);

  /** Fill the responders from a rate for the patients typed (each arm its own rate). */
  function preset(rateT: number, rateC: number) {
    const kT = Number(patientsT);
    const kC = Number(patientsC);
    if (Number.isInteger(kT) && kT >= 0) setRespondersT(String(rounded(rateT, kT)));
    if (!single && Number.isInteger(kC) && kC >= 0) setRespondersC(String(rounded(rateC, kC)));
  }
  function toFinal() {
    setPatientsT(String(maxN - armT.evaluable));
    if (armC) setPatientsC(String(maxN - armC.evaluable));
  }

  const pendingNote =
    now.arms === "single"
      ? now.single.pending > 0
        ? ` The ${now.single.pending} pending patient${now.single.pending === 1 ? " is" : "s are"} the first of them.`
        : ""
      : now.experimental.pending + now.control.pending > 0
        ? ` The pending patients (experimental ${now.experimental.pending}, control ${now.control.pending}) are the first of them.`
        : "";

  return (
    <section aria-labelledby="what-if-title" className="flex flex-col gap-3">
      <h3 id="what-if-title" className="text-base font-semibold">
        What if
      </h3>
      <p className="text-sm text-stone-600">
        Suppose how many more patients become evaluable{single ? "" : " in each arm"} and how many of them respond; the locked rule&apos;s verdict at those counts appears as you type. Nothing is saved.{pendingNote}
      </p>
      <div className={`grid gap-3 ${single ? "sm:grid-cols-2" : "sm:grid-cols-4"}`}>
        <Field label={single ? `More evaluable patients (up to ${maxN - armT.evaluable})` : `${armT.label}: more patients (up to ${maxN - armT.evaluable})`} name="what-if-patients">
          <TextInput id="what-if-patients" name="what-if-patients" inputMode="numeric" value={patientsT} onChange={(e) => setPatientsT(e.target.value)} />
        </Field>
        <Field label={single ? "Responders among them" : `${armT.label}: responders among them`} name="what-if-responders">
          <TextInput id="what-if-responders" name="what-if-responders" inputMode="numeric" value={respondersT} onChange={(e) => setRespondersT(e.target.value)} />
        </Field>
        {armC ? (
          <>
            <Field label={`${armC.label}: more patients (up to ${maxN - armC.evaluable})`} name="what-if-patients-control">
              <TextInput id="what-if-patients-control" name="what-if-patients-control" inputMode="numeric" value={patientsC} onChange={(e) => setPatientsC(e.target.value)} />
            </Field>
            <Field label={`${armC.label}: responders among them`} name="what-if-responders-control">
              <TextInput id="what-if-responders-control" name="what-if-responders-control" inputMode="numeric" value={respondersC} onChange={(e) => setRespondersC(e.target.value)} />
            </Field>
          </>
        ) : null}
      </div>
      <div className="flex flex-wrap gap-2" role="group" aria-label="Fill the responders from a rate">
        <Button type="button" variant="secondary" onClick={toFinal}>
          All remaining patients
        </Button>
        {rates.arms === "single" ? (
          <>
            <Button type="button" variant="secondary" onClick={() => preset(rates.p0, 0)}>
              Respond at p0 ({rates.p0})
            </Button>
            <Button type="button" variant="secondary" onClick={() => preset(rates.p1, 0)}>
              Respond at p1 ({rates.p1})
            </Button>
          </>
        ) : (
          <>
            <Button type="button" variant="secondary" onClick={() => preset(rates.controlRate, rates.controlRate)}>
              Both arms at the control rate ({rates.controlRate})
            </Button>
            <Button type="button" variant="secondary" onClick={() => preset(rates.experimentalRate, rates.controlRate)}>
              At the design&apos;s rates ({rates.experimentalRate} / {rates.controlRate})
            </Button>
          </>
        )}
        <Button type="button" variant="secondary" onClick={() => preset(rateT0, rateC0)}>
          At the observed rate{single ? "" : "s"}
        </Button>
      </div>
      <div aria-live="polite" data-testid="what-if-answer" className="flex flex-col gap-1">
        {empty ? (
          <p className="text-sm text-stone-500">Enter every count.</p>
        ) : result.state === "error" ? (
          <p className="text-berry-700">{result.message}</p>
        ) : result.state === "answer" ? (
          <Answer a={result.answer} single={single} />
        ) : (
          <p className="text-sm text-stone-500">Working…</p>
        )}
      </div>
      <WhatIfPlot boundaries={boundaries} observedPath={observedPath} answer={result.state === "answer" ? result.answer : null} twoArms={!single} />
    </section>
  );
}

const VERDICT: Record<string, string> = {
  continue: "Continue",
  futility: "Stop for futility",
  efficacy: "Stop for efficacy",
  safety: "Stop for safety",
  success: "Final analysis: success",
  "no success": "Final analysis: no success",
};

function verdict(a: WhatIfAnswer): string {
  const d = a.decision;
  if (d.action === "final") return VERDICT[d.success ? "success" : "no success"];
  if (d.action === "stop") return VERDICT[d.stop];
  return VERDICT.continue;
}

function Answer({ a, single }: { a: WhatIfAnswer; single: boolean }) {
  const where = single ? `${a.to.responders} responders of ${a.to.n}` : `experimental ${a.to.responders} of ${a.to.n}, control ${a.to.respondersControl} of ${a.to.nControl}`;
  return (
    <>
      <p>
        At {where}
        {a.plannedLook !== null ? ` (the planned look at ${a.plannedLook})` : " (between planned looks: as if a look were held there)"}:{" "}
        <strong data-testid="what-if-verdict">{verdict(a)}</strong>
        {a.predictiveProbability !== null ? (
          <>
            {" "}
            · predictive probability of success <strong data-testid="what-if-pp">{formatProbability(a.predictiveProbability)}</strong>
          </>
        ) : null}
        {a.posteriorProbabilityMonitoring !== null ? <> · posterior monitoring probability {formatProbability(a.posteriorProbabilityMonitoring)}</> : null}
      </p>
      <p className="text-sm text-stone-700" data-testid="what-if-reason">
        {a.decision.reason}
      </p>
      <p className="text-xs text-stone-500">
        Boundaries at n = {a.boundary.n}
        {single ? "" : " (experimental arm, at the supposed control count)"}: futility at or below {formatBoundary(a.boundary.futilityMax)}, {a.final ? "success" : "efficacy"} at or above {formatBoundary(a.boundary.efficacyMin)}. The safety rule is not projected.
      </p>
    </>
  );
}

function WhatIfPlot({ boundaries, observedPath, answer, twoArms }: { boundaries: BoundaryRow[]; observedPath: Review["observedPath"]; answer: WhatIfAnswer | null; twoArms: boolean }) {
  const n = boundaries.map((b) => b.n);
  const data: Record<string, unknown>[] = [
    { x: n, y: boundaries.map((b) => b.futilityMax), type: "scatter", mode: "lines+markers", name: "Futility: stop at or below", line: { color: CAIRN_COLOURS.futility, shape: "hv" }, connectgaps: false },
    { x: n, y: boundaries.map((b) => b.efficacyMin), type: "scatter", mode: "lines+markers", name: "Efficacy / success: at or above", line: { color: CAIRN_COLOURS.efficacy, shape: "hv" }, connectgaps: false },
    { x: [0, ...observedPath.map((o) => o.n)], y: [0, ...observedPath.map((o) => o.responders)], type: "scatter", mode: "lines+markers", name: twoArms ? "Observed (experimental arm)" : "Observed", line: { color: CAIRN_COLOURS.observed, width: 2.5 }, marker: { size: 9, symbol: "diamond" } },
  ];
  if (answer) {
    data.push({ x: [answer.from.n, answer.to.n], y: [answer.from.responders, answer.to.responders], type: "scatter", mode: "lines+markers", name: "What if (supposed)", line: { color: CAIRN_COLOURS.observed, width: 2, dash: "dash" }, marker: { size: 9, symbol: "diamond-open" } });
    data.push({ x: [answer.boundary.n], y: [answer.boundary.futilityMax], type: "scatter", mode: "markers", name: "Futility at the supposed n", marker: { color: CAIRN_COLOURS.futility, size: 11, symbol: "triangle-down-open", line: { width: 2 } } });
    data.push({ x: [answer.boundary.n], y: [answer.boundary.efficacyMin], type: "scatter", mode: "markers", name: "Efficacy / success at the supposed n", marker: { color: CAIRN_COLOURS.efficacy, size: 11, symbol: "triangle-up-open", line: { width: 2 } } });
  }
  const summary = answer
    ? `Observed ${observedPath.at(-1)?.responders ?? 0} responders of ${observedPath.at(-1)?.n ?? 0}; supposed ${answer.to.responders} of ${answer.to.n}, against futility at or below ${formatBoundary(answer.boundary.futilityMax)} and efficacy at or above ${formatBoundary(answer.boundary.efficacyMin)} at n = ${answer.boundary.n}.`
    : `The planned boundaries and the observed path; type counts above to draw a supposed next step.`;
  const numbers = {
    columns: ["Evaluable patients", "Futility: stop at or below", "Efficacy / success: at or above"],
    rows: boundaries.map((b) => [b.n, b.futilityMax, b.efficacyMin]),
    note: answer ? `Supposed path: ${answer.from.responders} of ${answer.from.n} to ${answer.to.responders} of ${answer.to.n}.` : undefined,
  };
  return (
    <CairnPlot
      title="Stopping boundaries with the observed path and the supposed one (dashed)"
      fileName="what-if-boundaries"
      summary={summary}
      numbers={numbers}
      data={data as never}
      layout={{ xaxis: { title: { text: twoArms ? "Evaluable patients per arm" : "Evaluable patients" }, rangemode: "tozero" }, yaxis: { title: { text: "Cumulative responders" }, rangemode: "tozero" } }}
    />
  );
}
