"use client";
/**
 * CLOSED: "what would it take?" for the look under review: the responders still needed among the
 * patients still to come, look by look (lib/stats/what-it-takes.ts), in numbers and in sentences;
 * for two arms the outcome region over (experimental, control) responders still to come, drawn.
 * Rendered only inside the closed review (viewClosed).
 */
import { useState } from "react";
import { CairnPlot, CAIRN_COLOURS } from "@/components/charts/plot";
import { SelectInput } from "@/components/ui/field";
import { formatBoundary, formatProbability } from "@/lib/format";
import type { SingleArmWhatItTakes, TwoArmWhatItTakes, TwoArmLookAhead } from "@/lib/stats/what-it-takes";
import type { PendingOutlook } from "@/lib/review/what-if";

const among = (v: number | null, ahead: number) => (v === null ? "out of reach" : `${v} of ${ahead}`);

export function WhatItTakes({ takes, pending }: { takes: SingleArmWhatItTakes | TwoArmWhatItTakes; pending: PendingOutlook | null }) {
  return (
    <section aria-labelledby="what-it-takes-title" className="flex flex-col gap-3">
      <h3 id="what-it-takes-title" className="text-base font-semibold">
        What it takes
      </h3>
      <p className="text-sm text-stone-600">
        The responders still needed among the patients still to come, under the locked rule, for each later planned look. Patients enrolled but not yet evaluable at the cut-off count among those still to come. The response rule only: the safety rule is watched on its own counts. Cairn is decision support: the DMC charter, the protocol and the regulator decide.
      </p>
      {takes.arms === "single" ? <SingleArm takes={takes} /> : <TwoArms takes={takes} />}
      {pending ? <PendingTable outlook={pending} /> : null}
    </section>
  );
}

function SingleArm({ takes }: { takes: SingleArmWhatItTakes }) {
  if (!takes.final) return <p className="text-sm">This is the final analysis: no patient is still to come.</p>;
  return (
    <>
      <p className="text-base font-medium" data-testid="what-it-takes-final">
        {takes.final.sentence}
      </p>
      <table className="cairn-table" aria-label="What it takes at each later look">
        <thead>
          <tr>
            <th>Planned look (n)</th>
            <th>Patients still to come</th>
            <th>Futility: stops with at most (responders among them)</th>
            <th>Efficacy / success: needs at least</th>
            <th>In words</th>
          </tr>
        </thead>
        <tbody>
          {takes.looks.map((l) => (
            <tr key={l.n} data-testid="what-it-takes-row">
              <td>
                {l.n}
                {l.final ? " (final)" : ""}
              </td>
              <td>{l.ahead}</td>
              <td>{l.futilityAtMost === null ? "cannot stop" : l.futilityAtMost >= l.ahead ? `stops whatever happens` : `${l.futilityAtMost} of ${l.ahead}`}</td>
              <td>{l.final || l.efficacyMin !== null ? among(l.efficacyAtLeast, l.ahead) : "no efficacy stop"}</td>
              <td className="text-sm">{l.sentence}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="text-xs text-stone-500">
        Cumulative boundaries behind these counts: {takes.looks.map((l) => `n = ${l.n}: futility at or below ${formatBoundary(l.futilityMax)}, ${l.final ? "success" : "efficacy"} at or above ${formatBoundary(l.efficacyMin)}`).join("; ")}. Responders so far: {takes.responders} of {takes.evaluable}
        {takes.pending ? `, ${takes.pending} pending` : ""}.
      </p>
    </>
  );
}

function TwoArms({ takes }: { takes: TwoArmWhatItTakes }) {
  const [lookN, setLookN] = useState(takes.final?.n ?? takes.looks[takes.looks.length - 1]?.n ?? 0);
  if (!takes.looks.length) return <p className="text-sm">No later planned look: no patient is still to come in both arms.</p>;
  const look = takes.looks.find((l) => l.n === lookN) ?? takes.looks[takes.looks.length - 1];
  return (
    <>
      {takes.final ? (
        <p className="text-base font-medium" data-testid="what-it-takes-final">
          {takes.final.sentence}
        </p>
      ) : null}
      <ul className="list-disc pl-5 text-sm">
        {takes.looks
          .filter((l) => !l.final)
          .map((l) => (
            <li key={l.n} data-testid="what-it-takes-row">
              {l.sentence}
            </li>
          ))}
      </ul>
      <div className="max-w-xs">
        <label htmlFor="what-it-takes-look" className="text-sm font-medium text-stone-700">
          Region drawn for
        </label>
        <SelectInput id="what-it-takes-look" name="what-it-takes-look" value={look.n} onChange={(e) => setLookN(Number(e.target.value))}>
          {takes.looks.map((l) => (
            <option key={l.n} value={l.n}>
              {l.final ? `the final analysis (${l.n} per arm)` : `the look at ${l.n} per arm`}
            </option>
          ))}
        </SelectInput>
      </div>
      <TwoArmRegion look={look} />
      <table className="cairn-table" aria-label={`Experimental responders needed at ${look.final ? "the final analysis" : `the look at ${look.n} per arm`}`}>
        <thead>
          <tr>
            <th>Control responders among the {look.aheadC} still to come</th>
            <th>Experimental responders needed among {look.aheadT} ({look.final ? "success" : "efficacy"})</th>
            <th>Futility with at most</th>
          </tr>
        </thead>
        <tbody>
          {sampleControl(look).map((yC) => (
            <tr key={yC}>
              <td>
                {yC}
                {yC === look.expectedControl ? " (observed rate)" : ""}
              </td>
              <td>{among(look.efficacyAtLeastT[yC], look.aheadT)}</td>
              <td>{look.futilityAtMostT[yC] === null ? "cannot stop" : look.futilityAtMostT[yC]}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </>
  );
}

/** At most about a dozen control counts in the table, always with the one at the observed rate. */
function sampleControl(look: TwoArmLookAhead): number[] {
  const step = Math.max(1, Math.ceil((look.aheadC + 1) / 12));
  const ys = new Set<number>();
  for (let y = 0; y <= look.aheadC; y += step) ys.add(y);
  ys.add(look.aheadC);
  ys.add(look.expectedControl);
  return [...ys].sort((a, b) => a - b);
}

/** The outcome of every (control, experimental) count still to come, as a three-colour grid. */
function TwoArmRegion({ look }: { look: TwoArmLookAhead }) {
  const z: number[][] = [];
  const text: string[][] = [];
  const words = look.final ? ["no success", "", "success"] : ["futility", "continue", "efficacy"];
  for (let yT = 0; yT <= look.aheadT; yT++) {
    const row: number[] = [];
    const trow: string[] = [];
    for (let yC = 0; yC <= look.aheadC; yC++) {
      const eff = look.efficacyAtLeastT[yC];
      const fut = look.futilityAtMostT[yC];
      const v = eff !== null && yT >= eff ? 2 : fut !== null && yT <= fut ? 0 : 1;
      row.push(v);
      trow.push(words[v]);
    }
    z.push(row);
    text.push(trow);
  }
  const ax = Array.from({ length: look.aheadC + 1 }, (_, i) => i);
  const ay = Array.from({ length: look.aheadT + 1 }, (_, i) => i);
  // The edge between cells: half a count below the first successful (or efficacious) count.
  const edge = ax.map((yC) => (look.efficacyAtLeastT[yC] ?? look.aheadT + 1) - 0.5);
  const edgeX = [-0.5, ...ax, look.aheadC + 0.5];
  const edgeY = [edge[0], ...edge, edge[edge.length - 1]];
  const anyEdge = look.efficacyAtLeastT.some((v) => v !== null);
  return (
    <CairnPlot
      title={`Outcome region ${look.final ? "at the final analysis" : `at the look at ${look.n} per arm`} over the responders still to come`}
      fileName={`what-it-takes-region-${look.n}`}
      height={380}
      data={
        [
          {
            type: "heatmap",
            x: ax,
            y: ay,
            z,
            text,
            hovertemplate: "control +%{x}, experimental +%{y}: %{text}<extra></extra>",
            zmin: 0,
            zmax: 2,
            showscale: false,
            colorscale: [
              [0, `${CAIRN_COLOURS.futility}55`],
              [0.33, `${CAIRN_COLOURS.futility}55`],
              [0.34, "#f5f3ee"],
              [0.66, "#f5f3ee"],
              [0.67, `${CAIRN_COLOURS.efficacy}66`],
              [1, `${CAIRN_COLOURS.efficacy}66`],
            ],
          },
          ...(anyEdge ? [{ x: edgeX, y: edgeY, type: "scatter", mode: "lines", name: look.final ? "Success: at or above" : "Efficacy: at or above", line: { color: CAIRN_COLOURS.efficacy, shape: "hvh", width: 2 }, hoverinfo: "skip" }] : []),
          { x: [look.expectedControl], y: [look.efficacyAtLeastT[look.expectedControl]], type: "scatter", mode: "markers", name: "Control at its observed rate", marker: { color: CAIRN_COLOURS.observed, size: 10, symbol: "diamond" } },
        ] as never
      }
      layout={{
        xaxis: { title: { text: `Control responders still to come (of ${look.aheadC})` }, range: [-0.5, look.aheadC + 0.5] },
        yaxis: { title: { text: `Experimental still to come (of ${look.aheadT})` }, range: [-0.5, look.aheadT + 0.5] },
      }}
    />
  );
}

function PendingTable({ outlook }: { outlook: PendingOutlook }) {
  return (
    <div className="flex flex-col gap-2" data-testid="pending-outlook">
      <h4 className="text-sm font-semibold">When the pending outcomes arrive</h4>
      <p className="text-sm text-stone-600">
        The predictive probability now ({formatProbability(outlook.predictiveProbability)}) already counts the pending patients among those still to come. Once their outcomes are known it moves to one of these values, with the probability shown (assumption: a pending patient responds like any future patient).
      </p>
      {outlook.arms === "single" ? (
        <table className="cairn-table" aria-label="Predictive probability once the pending outcomes are known">
          <thead>
            <tr>
              <th>Responders among the {outlook.pending} pending</th>
              <th>Probability of that</th>
              <th>Predictive probability then</th>
            </tr>
          </thead>
          <tbody>
            {outlook.rows.map((r) => (
              <tr key={r.responders}>
                <td>{r.responders}</td>
                <td>{formatProbability(r.probability)}</td>
                <td>{formatProbability(r.predictiveProbability)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : outlook.cells.length <= 49 ? (
        <table className="cairn-table" aria-label="Predictive probability once the pending outcomes are known">
          <thead>
            <tr>
              <th>Responders among pending (experimental {outlook.pendingT}, control {outlook.pendingC})</th>
              <th>Probability of that</th>
              <th>Predictive probability then</th>
            </tr>
          </thead>
          <tbody>
            {outlook.cells.map((c) => (
              <tr key={`${c.respondersT}-${c.respondersC}`}>
                <td>
                  experimental {c.respondersT}, control {c.respondersC}
                </td>
                <td>{formatProbability(c.probability)}</td>
                <td>{formatProbability(c.predictiveProbability)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : (
        <p className="text-sm">Too many pending patients to list every combination; the what-if below answers any one of them.</p>
      )}
    </div>
  );
}
