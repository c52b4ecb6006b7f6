/**
 * The closed part of a meeting packet, built from the closed review (lib/review/compute-review.ts,
 * the same computation and the same curves the Closed review screen draws). CLOSED output: only
 * for DMC members and the unblinded statistician.
 */
import { format } from "date-fns";
import { formatBoundary, formatProbability, formatRate } from "@/lib/format";
import type { Review, ReproducibilityRecord } from "@/lib/review/compute-review";
import type { LookDecision, MixtureBeta } from "@/lib/stats/types";
import type { PacketChart, PacketSection } from "./document";
import { CAIRN_COLOURS } from "@/lib/charts/palette";


export type ClosedPacketInput = {
  review: Review;
  record: ReproducibilityRecord;
  closedAgenda: string;
  design: { id: number; version: number; lockedAt: Date | null; ruleLabel: string };
  /** Analysis lock: who signed and when (open facts, listed here for the record). */
  lock: { signedBy: string | null; lockedAt: Date | null };
};

export function decisionLabel(d: LookDecision): string {
  if (d.action === "continue") return "Continue to the next look";
  if (d.action === "stop") return d.stop === "futility" ? "Stop for futility" : d.stop === "efficacy" ? "Stop for efficacy" : "Stop for safety";
  return d.success ? "Final analysis: success criterion met" : "Final analysis: success criterion not met";
}

function mixtureText(m: MixtureBeta): string {
  const f = (v: number) => String(+v.toFixed(4));
  if (m.length === 1) return `Beta(${f(m[0].a)}, ${f(m[0].b)})`;
  return m.map((c) => `${f(c.weight)} x Beta(${f(c.a)}, ${f(c.b)})`).join(" + ");
}

const interval = (i: { lower: number; upper: number }) => `${formatRate(i.lower)} to ${formatRate(i.upper)}`;

function densityChart(review: Review): PacketChart {
  const colours = [CAIRN_COLOURS.posterior, CAIRN_COLOURS.control];
  let ymax = 0;
  const series: PacketChart["series"] = review.arms.map((a, i) => {
    const pts: Array<[number, number]> = [];
    a.curves.p.forEach((p, k) => {
      const d = a.curves.density[k];
      if (d !== null && Number.isFinite(d)) {
        pts.push([p, d]);
        ymax = Math.max(ymax, d);
      }
    });
    return { name: `${a.label} posterior`, kind: "line" as const, colour: colours[i % colours.length], points: pts, dashed: a.role === "control" };
  });
  if (review.reference.kind === "p0") series.push({ name: `p0 = ${formatRate(review.reference.value)}`, kind: "vline", colour: CAIRN_COLOURS.futility, points: [[review.reference.value, 0]], dashed: true });
  return { title: "Posterior density of the response rate", xLabel: "Response rate", yLabel: "Density", xRange: [0, 1], yRange: [0, Math.max(1, ymax * 1.08)], series };
}

function boundaryChart(review: Review): PacketChart {
  const nMax = review.plannedLooks[review.plannedLooks.length - 1] ?? 1;
  const fut = review.boundaries.filter((b) => b.futilityMax !== null).map((b) => [b.n, b.futilityMax as number] as [number, number]);
  const eff = review.boundaries.filter((b) => b.efficacyMin !== null).map((b) => [b.n, b.efficacyMin as number] as [number, number]);
  const obs = review.observedPath.map((o) => [o.n, o.responders] as [number, number]);
  const two = review.designKind === "two";
  return {
    title: two ? "Stopping boundaries (experimental arm, read at the control count) with the observed path" : "Stopping boundaries with the observed path",
    xLabel: two ? "Evaluable patients per arm" : "Evaluable patients",
    yLabel: two ? "Experimental responders" : "Cumulative responders",
    xRange: [0, nMax],
    yRange: [0, nMax],
    series: [
      // Steps, as on the screen: a boundary holds from one look to the next.
      { name: "Futility: stop at or below", kind: "step", colour: CAIRN_COLOURS.futility, points: fut },
      { name: "Efficacy (final: success) at or above", kind: "step", colour: CAIRN_COLOURS.efficacy, points: eff },
      { name: "Observed", kind: "line", colour: CAIRN_COLOURS.observed, points: [[0, 0], ...obs] },
      { name: "Observed looks", kind: "points", colour: CAIRN_COLOURS.observed, points: obs },
      // Boundaries at each look's actual evaluable count, where that differs from the plan.
      { name: "Futility at the observed n", kind: "points", colour: CAIRN_COLOURS.futility, points: review.observedBoundaries.filter((o) => o.futilityMax !== null).map((o) => [o.n, o.futilityMax as number] as [number, number]) },
      { name: "Efficacy at the observed n", kind: "points", colour: CAIRN_COLOURS.efficacy, points: review.observedBoundaries.filter((o) => o.efficacyMin !== null).map((o) => [o.n, o.efficacyMin as number] as [number, number]) },
    ],
  };
}

const REGION_WORDS = { futility: "futility region", continue: "between the boundaries", efficacy: "efficacy region" } as const;

export function buildClosedSections(input: ClosedPacketInput): PacketSection[] {
  const r = input.review;
  const single = r.designKind === "single";
  const statLabel = r.ruleKind === "predictive" ? "Predictive probability of success" : "Posterior probability (monitoring rule)";
  const pct = `${Math.round(r.credibleLevel * 100)}%`;
  const sections: PacketSection[] = [];

  sections.push({
    id: "closed-agenda",
    part: "closed",
    title: "Closed report: closed session agenda",
    blocks: [
      { kind: "paragraph", tone: "caution", text: "CLOSED. For DMC members and the unblinded statistician only. Do not forward." },
      { kind: "paragraph", text: input.closedAgenda.trim() || "No closed-session agenda was entered." },
    ],
  });

  sections.push({
    id: "closed-counts",
    part: "closed",
    title: `Interim counts at look ${r.lookNumber}`,
    blocks: [
      {
        kind: "table",
        caption: `Cumulative counts per arm at data cut-off ${r.cutoffDate ?? "not set"}`,
        columns: ["Arm", "Enrolled", "Evaluable for response", "Responders", "Treated (evaluable for toxicity)", "With toxicity"],
        rows: r.arms.map((a) => [
          a.label,
          String(a.enrolled),
          String(a.evaluable),
          String(a.responders),
          a.treated === null ? "not recorded" : String(a.treated),
          a.toxicities === null ? "not recorded" : String(a.toxicities),
        ]),
      },
    ],
  });

  const postRows = r.arms.map((a) => [
    a.label,
    mixtureText(a.posterior),
    formatRate(a.summary.mean),
    formatRate(a.summary.median),
    interval(a.summary.equalTailed),
    a.summary.hpd.pieces.map(interval).join(" and ") + (a.summary.hpd.notUnique ? " (not unique)" : ""),
    a.probAboveP0 === null ? "-" : formatProbability(a.probAboveP0),
    interval(a.clopperPearson),
    interval(a.wilson),
  ]);
  sections.push({
    id: "closed-posteriors",
    part: "closed",
    title: "Posterior response rates",
    blocks: [
      {
        kind: "table",
        caption: `Posteriors per arm; ${pct} credible intervals; Clopper-Pearson exact and Wilson score intervals for comparison`,
        columns: ["Arm", "Posterior", "Mean", "Median", `${pct} equal-tailed`, `${pct} HPD`, single && r.reference.kind === "p0" ? `P(p > ${formatRate(r.reference.value)})` : "P(p > p0)", "Clopper-Pearson", "Wilson"],
        rows: postRows,
      },
      ...(r.difference
        ? [{ kind: "facts" as const, rows: [[`P(pT - pC > ${formatRate(r.difference.delta)} | data)`, formatProbability(r.difference.probExceeds)]] as Array<[string, string]> }]
        : []),
      { kind: "chart", chart: densityChart(r) },
    ],
  });

  const historyStat = (h: Review["history"][number]) => {
    const e = h.evaluation;
    const v = e.predictiveProbability ?? e.posteriorProbabilityMonitoring;
    return v === null ? (e.final ? "final rule" : "-") : formatProbability(v);
  };
  const ppPoints = r.history
    .map((h) => [h.n, h.evaluation.predictiveProbability ?? h.evaluation.posteriorProbabilityMonitoring] as [number, number | null])
    .filter((p): p is [number, number] => p[1] !== null);
  const nMax = r.plannedLooks[r.plannedLooks.length - 1] ?? 1;
  sections.push({
    id: "closed-predictive",
    part: "closed",
    title: r.ruleKind === "predictive" ? "Predictive probability of success" : "Monitoring probability",
    blocks: [
      {
        kind: "facts",
        rows: [
          [`${statLabel} at look ${r.lookNumber}`, historyStat(r.current)],
          [single ? "P(p > p0 | data) (the final rule's quantity now)" : "P(pT - pC > delta | data) (the final rule's quantity now)", formatProbability(r.current.evaluation.posteriorProbabilitySuccess)],
        ],
      },
      {
        kind: "table",
        caption: "Look by look",
        columns: ["Look", single ? "Evaluable" : "Evaluable (E / C)", single ? "Responders" : "Responders (E / C)", statLabel, "Rule says"],
        rows: r.history.map((h) => [
          String(h.lookNumber),
          single ? String(h.n) : `${h.n} / ${h.nControl}`,
          single ? String(h.responders) : `${h.responders} / ${h.respondersControl}`,
          historyStat(h),
          decisionLabel(h.evaluation.decision),
        ]),
      },
      ...(ppPoints.length
        ? [
            {
              kind: "chart" as const,
              chart: {
                title: `${statLabel} over looks`,
                xLabel: single ? "Evaluable patients" : "Evaluable patients per arm",
                yLabel: "Probability",
                xRange: [0, nMax] as [number, number],
                yRange: [0, 1] as [number, number],
                series: [{ name: statLabel, kind: "line" as const, colour: CAIRN_COLOURS.posterior, points: ppPoints }, { name: "Looks", kind: "points" as const, colour: CAIRN_COLOURS.observed, points: ppPoints }],
              },
            },
          ]
        : []),
    ],
  });

  sections.push({
    id: "closed-boundaries",
    part: "closed",
    title: "Stopping boundaries",
    blocks: [
      {
        kind: "table",
        caption: single
          ? "Largest responder count that stops for futility and smallest that stops for efficacy, per planned look (final look: without / with success)"
          : "Experimental responders that stop, read at the control count shown (observed at looks done, projected from the control rate otherwise)",
        columns: single ? ["Patients", "Futility: stop at or below", "Efficacy: stop at or above", "Observed responders"] : ["Patients per arm", "Control responders", "Futility: stop at or below", "Efficacy: stop at or above", "Observed (E)"],
        rows: r.boundaries.map((b) => {
          const seen = r.observedPath.find((o) => o.n === b.n);
          const tail = [formatBoundary(b.futilityMax), formatBoundary(b.efficacyMin), seen ? String(seen.responders) : "-"];
          const head = `${b.n}${b.final ? " (final)" : ""}`;
          return single ? [head, ...tail] : [head, `${b.controlResponders ?? "-"} (${b.controlBasis ?? "-"})`, ...tail];
        }),
      },
      {
        kind: "table",
        caption: "Each look done, against the boundaries computed at its actual evaluable count, beside those of its planned size",
        columns: ["Look", "Planned n", "Actual n", "Responders", "Futility at actual n", "Efficacy at actual n", "Futility / efficacy at planned n", "Where"],
        rows: r.observedBoundaries.map((o) => [
          String(o.lookNumber),
          o.plannedN === null ? "-" : String(o.plannedN),
          o.nControl === null ? String(o.n) : `${o.n} (control ${o.nControl})`,
          o.controlResponders === null ? String(o.responders) : `${o.responders} (control ${o.controlResponders})`,
          formatBoundary(o.futilityMax),
          formatBoundary(o.efficacyMin),
          o.planned ? `${formatBoundary(o.planned.futilityMax)} / ${formatBoundary(o.planned.efficacyMin)}` : "-",
          o.final ? (o.region === "efficacy" ? "success (final)" : "no success (final)") : REGION_WORDS[o.region],
        ]),
      },
      { kind: "chart", chart: boundaryChart(r) },
    ],
  });

  const s = r.safety;
  sections.push({
    id: "closed-safety",
    part: "closed",
    title: "Safety",
    blocks: s
      ? [
          {
            kind: "facts",
            rows: [
              ["Toxicities", `${s.toxicities} of ${s.treated} treated patients (evaluable for toxicity)`],
              ["Posterior of the toxicity rate", `${mixtureText(s.posterior)}, mean ${formatRate(s.summary.mean)}`],
              [`P(q > ${s.limitLabel ?? formatRate(s.qmax)} | data)`, formatProbability(s.probAboveLimit)],
              ["Toxicity alarm level (θS)", `${s.thetaS} (${s.crossed ? "CROSSED: the data favour stopping for safety" : "not crossed"})`],
            ],
          },
          {
            kind: "table",
            caption: "Smallest toxicity count that triggers a safety stop, per planned look",
            columns: ["Patients", "Safety stop at or above", "Observed toxicities"],
            rows: s.boundary.map((b) => {
              const seen = s.observedPath.find((o) => o.n === b.n);
              return [String(b.n), formatBoundary(b.toxicityMin), seen ? String(seen.toxicities) : "-"];
            }),
          },
          {
            kind: "table",
            caption: "Each look done, against the safety boundary at its actual number of patients, beside that of its planned size",
            columns: ["Look", "Planned n", "Actual n", "Toxicities", "Stop at or above (actual n)", "Stop at or above (planned n)", "Crossed"],
            rows: s.observed.map((o) => [String(o.lookNumber), o.plannedN === null ? "-" : String(o.plannedN), String(o.n), String(o.toxicities), formatBoundary(o.toxicityMin), o.planned ? formatBoundary(o.planned.toxicityMin) : "-", o.crossed ? "yes" : "no"]),
          },
          {
            kind: "chart",
            chart: {
              title: "Safety boundary with the observed toxicities",
              xLabel: "Evaluable patients",
              yLabel: "Cumulative toxicities",
              xRange: [0, nMax],
              yRange: [0, nMax],
              series: [
                { name: "Safety stop at or above", kind: "line", colour: CAIRN_COLOURS.safety, points: s.boundary.filter((b) => b.toxicityMin !== null).map((b) => [b.n, b.toxicityMin as number]) },
                { name: "Observed", kind: "line", colour: CAIRN_COLOURS.observed, points: [[0, 0], ...s.observedPath.map((o) => [o.n, o.toxicities] as [number, number])] },
                { name: "Observed looks", kind: "points", colour: CAIRN_COLOURS.observed, points: s.observedPath.map((o) => [o.n, o.toxicities] as [number, number]) },
                { name: "Safety stop at the observed n", kind: "points", colour: CAIRN_COLOURS.safety, points: s.observed.filter((o) => o.toxicityMin !== null).map((o) => [o.n, o.toxicityMin as number] as [number, number]) },
              ],
            },
          },
        ]
      : [{ kind: "paragraph", text: "The locked design has no safety monitoring rule." }],
  });

  sections.push({
    id: "closed-sensitivity",
    part: "closed",
    title: "Prior sensitivity",
    blocks: [
      {
        kind: "table",
        caption: "The same data under other priors: does the conclusion rest on the prior?",
        columns: single ? ["Prior", "Specification", "Posterior mean", "P(p > p0)", "Predictive probability"] : ["Priors", "Specification", "Posterior means (E / C)", "P(pT - pC > delta)"],
        rows: r.sensitivity.map((row) =>
          single
            ? [row.label, row.description, formatRate(row.arms[0].summary.mean), formatProbability(row.arms[0].probAboveP0), row.predictiveProbability === null ? "-" : formatProbability(row.predictiveProbability)]
            : [row.label, row.description, row.arms.map((a) => formatRate(a.summary.mean)).join(" / "), formatProbability(row.probDifferenceExceeds)],
        ),
      },
    ],
  });

  sections.push({
    id: "closed-decision",
    part: "closed",
    title: "The decision under the locked rule",
    blocks: [
      { kind: "facts", rows: [["Rule", input.design.ruleLabel], ["What the rule says at this look", decisionLabel(r.decision)]] },
      { kind: "paragraph", text: r.decision.reason },
      { kind: "paragraph", tone: "caution", text: "The rule's outcome is decision support. The DMC weighs it with everything else it knows and recommends under its charter and the protocol." },
    ],
  });

  const rec = input.record;
  sections.push({
    id: "closed-reproducibility",
    part: "closed",
    title: "Reproducibility record",
    blocks: [
      {
        kind: "facts",
        rows: [
          ["Engine version", rec.engineVersion],
          ["Design", `version ${input.design.version} (id ${input.design.id}), locked ${input.design.lockedAt ? format(input.design.lockedAt, "d MMM yyyy HH:mm") + " UTC" : "not locked"}`],
          ["Analysis", `id ${rec.inputs.analysisId}, look ${r.lookNumber}, data cut-off ${r.cutoffDate ?? "not set"}`],
          ["Analysis locked", input.lock.lockedAt ? `${format(input.lock.lockedAt, "d MMM yyyy HH:mm")} UTC${input.lock.signedBy ? `, signed by ${input.lock.signedBy}` : ""}` : "not locked"],
          ["Credible level, curve points", `${rec.inputs.credibleLevel}, ${rec.inputs.gridPoints}`],
        ],
      },
      { kind: "paragraph", tone: "muted", text: `Design specification (JSON): ${JSON.stringify(rec.inputs.design)}` },
      { kind: "paragraph", tone: "muted", text: `Counts used (JSON): ${JSON.stringify(rec.inputs.looks)}` },
      { kind: "paragraph", tone: "muted", text: "Recomputing the closed review with these inputs and this engine version gives the numbers in this packet; the packet's content hash (on every page) identifies it." },
    ],
  });

  return sections;
}
