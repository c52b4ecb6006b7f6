"use client";
/**
 * CLOSED charts of the review page. Rendered only inside pages that passed viewClosed; they take
 * slices of the computed review (unrounded) and draw them with CairnPlot.
 */
import { CairnPlot, CAIRN_COLOURS } from "@/components/charts/plot";
import { cell, countAxis, densityAxis, probabilityAxis, sampleIndices } from "@/lib/charts/chart-numbers";
import { formatProbability } from "@/lib/format";
import type { ArmReview, BoundaryRow, LookReview, Review, SafetyReview } from "@/lib/review/compute-review";

type Shade = { lower: number; upper: number };

/** A filled trace under the density between lower and upper (the curve's own points plus the two ends). */
function shadeTrace(p: number[], density: number[], band: Shade, name: string, colour: string, dens: (x: number) => number) {
  const xs: number[] = [band.lower];
  const ys: number[] = [dens(band.lower)];
  p.forEach((x, i) => {
    if (x > band.lower && x < band.upper) {
      xs.push(x);
      ys.push(density[i]);
    }
  });
  xs.push(band.upper);
  ys.push(dens(band.upper));
  return { x: xs, y: ys, type: "scatter" as const, mode: "lines" as const, fill: "tozeroy" as const, fillcolor: colour, line: { width: 0 }, name, hoverinfo: "skip" as const };
}

/** Linear interpolation of the density curve at x, for the edges of a shaded band. */
function interpolateDensity(p: number[], density: number[], x: number): number {
  const step = p[1] - p[0];
  const i = Math.min(p.length - 2, Math.max(0, Math.floor(x / step)));
  const a = density[i];
  const b = density[i + 1];
  const t = (x - p[i]) / step;
  return a + (b - a) * t;
}

const ARM_COLOURS = [CAIRN_COLOURS.posterior, CAIRN_COLOURS.control];
const RATE_AXIS = "Response rate (proportion, 0 to 1)";
const TABLE_STEP = 0.05;
const stepNote = `Every ${TABLE_STEP} of the rate; the chart draws the full grid.`;
const p3 = (v: number) => v.toFixed(3);
const interval = (i: { lower: number; upper: number }) => `${p3(i.lower)} to ${p3(i.upper)}`;

/** A table of several curves that share one x grid, sampled every TABLE_STEP. */
function curveTable(xHeader: string, xs: number[], curves: { header: string; y: number[] }[], decimals = 3) {
  return { columns: [xHeader, ...curves.map((c) => c.header)], rows: sampleIndices(xs, TABLE_STEP).map((i) => [xs[i].toFixed(2), ...curves.map((c) => cell(c.y[i], decimals))]), note: stepNote };
}

export function PosteriorDensityPlot({ review, band }: { review: Pick<Review, "arms" | "reference" | "credibleLevel">; band?: { armId: number; lower: number; upper: number } | null }) {
  const data: Record<string, unknown>[] = [];
  const level = Math.round(review.credibleLevel * 100);
  review.arms.forEach((arm: ArmReview, k: number) => {
    const colour = ARM_COLOURS[k] ?? CAIRN_COLOURS.observed;
    const dens = (x: number) => interpolateDensity(arm.curves.p, arm.curves.density, x);
    const hpd = arm.summary.hpd.pieces;
    if (!band) hpd.forEach((piece, j) => data.push({ ...shadeTrace(arm.curves.p, arm.curves.density, piece, j === 0 ? `${arm.label}: ${level}% HPD` : "", `${colour}33`, dens), showlegend: j === 0 }));
    data.push({ x: arm.curves.p, y: arm.curves.density, type: "scatter", mode: "lines", name: `${arm.label} posterior`, line: { color: colour, width: 2 } });
    data.push({ x: arm.priorCurves.p, y: arm.priorCurves.density, type: "scatter", mode: "lines", name: `${arm.label} prior`, line: { color: colour, width: 1, dash: "dot" }, visible: "legendonly" });
    if (band && band.armId === arm.armId) data.push(shadeTrace(arm.curves.p, arm.curves.density, band, "Asked interval", `${CAIRN_COLOURS.efficacy}55`, dens));
  });
  const shapes: Record<string, unknown>[] = [];
  if (review.reference.kind === "p0")
    shapes.push({ type: "line", x0: review.reference.value, x1: review.reference.value, yref: "paper", y0: 0, y1: 1, line: { color: CAIRN_COLOURS.futility, dash: "dash", width: 1.5 } });
  const annotations = review.reference.kind === "p0" ? [{ x: review.reference.value, yref: "paper", y: 1, text: `p0 = ${review.reference.value}`, showarrow: false, yanchor: "bottom", font: { color: CAIRN_COLOURS.futility } }] : [];
  const summary =
    review.arms.map((a) => `${a.label}: ${a.responders} responders of ${a.evaluable} evaluable, posterior mean ${p3(a.summary.mean)}, ${level}% HPD ${a.summary.hpd.pieces.map(interval).join(" and ")}.`).join(" ") +
    (review.reference.kind === "p0" ? ` Dashed line: p0 = ${review.reference.value}.` : "") +
    (band ? ` Shaded: the asked interval ${p3(band.lower)} to ${p3(band.upper)}.` : "");
  const numbers = curveTable(
    "Response rate",
    review.arms[0].curves.p,
    review.arms.flatMap((a) => [
      { header: `${a.label} posterior density`, y: a.curves.density },
      { header: `${a.label} prior density`, y: a.priorCurves.density },
    ]),
  );
  return (
    <CairnPlot
      title="Posterior density of the response rate"
      summary={summary}
      numbers={numbers}
      fileName="posterior-density"
      data={data as never}
      layout={{ xaxis: probabilityAxis(RATE_AXIS), yaxis: densityAxis(), shapes: shapes as never, annotations: annotations as never }}
    />
  );
}

export function CumulativePlot({ review, band }: { review: Pick<Review, "arms" | "reference">; band?: { armId: number; lower: number; upper: number } | null }) {
  const data: Record<string, unknown>[] = review.arms.map((arm, k) => ({ x: arm.curves.p, y: arm.curves.cdf, type: "scatter" as const, mode: "lines" as const, name: `${arm.label}: P(rate ≤ x)`, line: { color: ARM_COLOURS[k] ?? CAIRN_COLOURS.observed, width: 2 } }));
  const shapes: Record<string, unknown>[] = review.reference.kind === "p0" ? [{ type: "line", x0: review.reference.value, x1: review.reference.value, yref: "paper", y0: 0, y1: 1, line: { color: CAIRN_COLOURS.futility, dash: "dash", width: 1.5 } }] : [];
  // The asked interval: shaded across the plot, and the rise of the curve over it (which is the
  // interval's probability) marked on the probability axis.
  const askedArm = band ? review.arms.find((a) => a.armId === band.armId) : undefined;
  let rise = "";
  if (band && askedArm) {
    const lowF = interpolateDensity(askedArm.curves.p, askedArm.curves.cdf, band.lower);
    const highF = interpolateDensity(askedArm.curves.p, askedArm.curves.cdf, band.upper);
    shapes.push({ type: "rect", x0: band.lower, x1: band.upper, yref: "paper", y0: 0, y1: 1, fillcolor: `${CAIRN_COLOURS.efficacy}22`, line: { width: 0 }, layer: "below" });
    data.push({ x: [0, band.lower, band.lower], y: [lowF, lowF, 0], type: "scatter", mode: "lines", name: "", showlegend: false, hoverinfo: "skip", line: { color: CAIRN_COLOURS.efficacy, dash: "dot", width: 1 } });
    data.push({ x: [0, band.upper, band.upper], y: [highF, highF, 0], type: "scatter", mode: "lines", name: "Asked interval", line: { color: CAIRN_COLOURS.efficacy, dash: "dot", width: 1 } });
    rise = ` Shaded: the asked interval ${p3(band.lower)} to ${p3(band.upper)} for ${askedArm.label}; the curve rises from ${p3(lowF)} to ${p3(highF)} over it, the interval's probability.`;
  }
  const summary =
    review.arms.map((a) => `${a.label}: median ${p3(a.summary.median)}, ${Math.round(a.summary.level * 100)}% equal-tailed interval ${interval(a.summary.equalTailed)}.`).join(" ") +
    (review.reference.kind === "p0" ? ` Dashed line: p0 = ${review.reference.value}.` : "") +
    rise;
  return (
    <CairnPlot
      title="Posterior cumulative distribution"
      summary={summary}
      numbers={curveTable("Response rate x", review.arms[0].curves.p, review.arms.map((a) => ({ header: `${a.label}: P(rate ≤ x)`, y: a.curves.cdf })))}
      fileName="posterior-cumulative"
      data={data as never}
      layout={{ xaxis: probabilityAxis(RATE_AXIS), yaxis: probabilityAxis("Cumulative probability (0 to 1)", {}, 0, 1, 0.2), shapes: shapes as never }}
    />
  );
}

export function PredictiveOverLooksPlot({ history, ruleKind, futilityThreshold, efficacyThreshold }: { history: LookReview[]; ruleKind: "predictive" | "posterior" | "uncertainStandard"; futilityThreshold: number; efficacyThreshold: number | null }) {
  const y = history.map((h) => (ruleKind === "predictive" ? h.evaluation.predictiveProbability : h.evaluation.posteriorProbabilityMonitoring));
  const x = history.map((h) => `Look ${h.lookNumber} (n = ${h.n})`);
  const label = ruleKind === "predictive" ? "Predictive probability of success" : "Posterior monitoring probability";
  const data: Record<string, unknown>[] = [
    { x, y, type: "scatter", mode: "lines+markers", name: label, line: { color: CAIRN_COLOURS.posterior, width: 2 }, marker: { size: 9 } },
    { x, y: x.map(() => futilityThreshold), type: "scatter", mode: "lines", name: `Futility threshold ${futilityThreshold}`, line: { color: CAIRN_COLOURS.futility, dash: "dash" } },
  ];
  if (efficacyThreshold !== null) data.push({ x, y: x.map(() => efficacyThreshold), type: "scatter", mode: "lines", name: `Efficacy threshold ${efficacyThreshold}`, line: { color: CAIRN_COLOURS.efficacy, dash: "dash" } });
  const last = history[history.length - 1];
  const summary = `${label} at each of ${history.length} look${history.length === 1 ? "" : "s"}${last ? `; at look ${last.lookNumber} (n = ${last.n}) it is ${formatProbability(y[y.length - 1])}` : ""}. Futility threshold ${futilityThreshold}${efficacyThreshold !== null ? `, efficacy threshold ${efficacyThreshold}` : ""}.`;
  return (
    <CairnPlot
      title={`${label} at each look`}
      summary={summary}
      numbers={{ columns: ["Look", "Evaluable patients", label], rows: history.map((h, i) => [h.lookNumber, h.n, cell(y[i])]) }}
      fileName="predictive-over-looks"
      data={data as never}
      layout={{ xaxis: { title: { text: "Look (evaluable patients)" }, automargin: true }, yaxis: probabilityAxis("Probability (0 to 1)", {}, 0, 1.02, 0.2) }}
    />
  );
}

export function BoundaryPlot({ boundaries, observedPath, observedBoundaries = [], twoArms }: { boundaries: BoundaryRow[]; observedPath: Review["observedPath"]; observedBoundaries?: Review["observedBoundaries"]; twoArms: boolean }) {
  const n = boundaries.map((b) => b.n);
  const data: Record<string, unknown>[] = [
    { x: n, y: boundaries.map((b) => b.futilityMax), type: "scatter", mode: "lines+markers", name: "Futility: stop at or below", line: { color: CAIRN_COLOURS.futility, shape: "hv" }, connectgaps: false },
    { x: n, y: boundaries.map((b) => b.efficacyMin), type: "scatter", mode: "lines+markers", name: "Efficacy / success: at or above", line: { color: CAIRN_COLOURS.efficacy, shape: "hv" }, connectgaps: false },
    { x: [0, ...observedPath.map((o) => o.n)], y: [0, ...observedPath.map((o) => o.responders)], type: "scatter", mode: "lines+markers", name: twoArms ? "Observed (experimental arm)" : "Observed", line: { color: CAIRN_COLOURS.observed, width: 2.5 }, marker: { size: 9, symbol: "diamond" } },
    // The boundaries at each look's actual evaluable count: the observation is read against these.
    { x: observedBoundaries.map((o) => o.n), y: observedBoundaries.map((o) => o.futilityMax), type: "scatter", mode: "markers", name: "Futility at the observed n", marker: { color: CAIRN_COLOURS.futility, size: 11, symbol: "triangle-down-open", line: { width: 2 } } },
    { x: observedBoundaries.map((o) => o.n), y: observedBoundaries.map((o) => o.efficacyMin), type: "scatter", mode: "markers", name: "Efficacy / success at the observed n", marker: { color: CAIRN_COLOURS.efficacy, size: 11, symbol: "triangle-up-open", line: { width: 2 } } },
  ];
  const maxN = Math.max(1, ...n, ...observedPath.map((o) => o.n));
  const maxY = Math.max(1, ...boundaries.map((b) => Math.max(b.futilityMax ?? 0, b.efficacyMin ?? 0)), ...observedPath.map((o) => o.responders));
  const lastSeen = observedPath[observedPath.length - 1];
  const summary = `Responder counts that stop the trial at each of ${boundaries.length} planned looks (steps), with the observed path${twoArms ? " of the experimental arm" : ""}${lastSeen ? `: ${lastSeen.responders} responders of ${lastSeen.n} evaluable at look ${lastSeen.lookNumber}` : ""}.`;
  const perArm = twoArms ? " per arm" : "";
  return (
    <CairnPlot
      title="Stopping boundaries and the observed path"
      summary={summary}
      numbers={{
        columns: [`Evaluable patients${perArm}`, "Futility: stop at or below", "Efficacy / success: at or above", "Observed responders"],
        rows: boundaries.map((b) => [b.n, b.futilityMax ?? "none", b.efficacyMin ?? "none", observedPath.find((o) => o.n === b.n)?.responders ?? null]),
      }}
      fileName="boundary-chart"
      data={data as never}
      layout={{ xaxis: countAxis(`Evaluable patients${perArm} (count)`, maxN), yaxis: countAxis("Cumulative responders (count)", maxY) }}
    />
  );
}

export function DifferencePlot({ grid, delta }: { grid: { d: number[]; density: number[] }; delta: number }) {
  const data = [
    { x: grid.d, y: grid.density, type: "scatter" as const, mode: "lines" as const, name: "Posterior of pT − pC", line: { color: CAIRN_COLOURS.posterior, width: 2 } },
    shadeTrace(grid.d, grid.density, { lower: delta, upper: 1 }, `pT − pC > ${delta}`, `${CAIRN_COLOURS.efficacy}33`, (x) => interpolateDensity(grid.d.map((v) => v + 1), grid.density, x + 1)),
  ];
  const peak = grid.density.reduce((best, v, i) => (v > grid.density[best] ? i : best), 0);
  return (
    <CairnPlot
      title="Posterior density of the difference in response rates"
      summary={`Density of the experimental minus the control response rate; highest near ${grid.d[peak]?.toFixed(2)}. Shaded: differences above ${delta}.`}
      numbers={curveTable("Difference pT − pC", grid.d, [{ header: "Posterior density", y: grid.density }])}
      fileName="difference-density"
      data={data}
      layout={{ xaxis: probabilityAxis("Experimental minus control response rate (difference of proportions)", {}, -1, 1, 0.2), yaxis: densityAxis("Density (per unit of difference)"), shapes: [{ type: "line", x0: delta, x1: delta, yref: "paper", y0: 0, y1: 1, line: { color: CAIRN_COLOURS.futility, dash: "dash" } }] as never }}
    />
  );
}

export function ToxicityPlot({ safety }: { safety: SafetyReview }) {
  const dens = (x: number) => interpolateDensity(safety.curves.p, safety.curves.density, x);
  const data = [
    shadeTrace(safety.curves.p, safety.curves.density, { lower: safety.qmax, upper: 1 }, `P(q > ${safety.qmax})`, `${CAIRN_COLOURS.safety}33`, dens),
    { x: safety.curves.p, y: safety.curves.density, type: "scatter" as const, mode: "lines" as const, name: "Toxicity posterior", line: { color: CAIRN_COLOURS.safety, width: 2 } },
  ];
  return (
    <CairnPlot
      title="Posterior density of the toxicity rate"
      summary={`${safety.toxicities} with toxicity among ${safety.treated} treated; posterior mean ${p3(safety.summary.mean)}. Shaded: rates above ${safety.qmax}, probability ${formatProbability(safety.probAboveLimit)}.`}
      numbers={curveTable("Toxicity rate", safety.curves.p, [{ header: "Posterior density", y: safety.curves.density }])}
      fileName="toxicity-posterior"
      data={data}
      layout={{ xaxis: probabilityAxis("Toxicity rate (proportion, 0 to 1)"), yaxis: densityAxis(), shapes: [{ type: "line", x0: safety.qmax, x1: safety.qmax, yref: "paper", y0: 0, y1: 1, line: { color: CAIRN_COLOURS.safety, dash: "dash" } }] as never }}
    />
  );
}
