"use client";
/**
 * CLOSED charts of the review page. Rendered only inside pages that passed viewClosed; they take
 * slices of the computed review (unrounded) and draw them with CairnPlot.
 */
import { CairnPlot, CAIRN_COLOURS } from "@/components/charts/plot";
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
export function interpolateDensity(p: number[], density: number[], x: number): number {
  const step = p[1] - p[0];
  const i = Math.min(p.length - 2, Math.max(0, Math.floor(x / step)));
  const a = density[i];
  const b = density[i + 1];
  const t = (x - p[i]) / step;
  return a + (b - a) * t;
}

const ARM_COLOURS = [CAIRN_COLOURS.posterior, CAIRN_COLOURS.control];

export function PosteriorDensityPlot({ review, band }: { review: Pick<Review, "arms" | "reference" | "credibleLevel">; band?: { armId: number; lower: number; upper: number } | null }) {
  const data: Record<string, unknown>[] = [];
  review.arms.forEach((arm: ArmReview, k: number) => {
    const colour = ARM_COLOURS[k] ?? CAIRN_COLOURS.observed;
    const dens = (x: number) => interpolateDensity(arm.curves.p, arm.curves.density, x);
    const hpd = arm.summary.hpd.pieces;
    if (!band) hpd.forEach((piece, j) => data.push({ ...shadeTrace(arm.curves.p, arm.curves.density, piece, j === 0 ? `${arm.label}: ${Math.round(review.credibleLevel * 100)}% HPD` : "", `${colour}33`, dens), showlegend: j === 0 }));
    data.push({ x: arm.curves.p, y: arm.curves.density, type: "scatter", mode: "lines", name: `${arm.label} posterior`, line: { color: colour, width: 2 } });
    data.push({ x: arm.priorCurves.p, y: arm.priorCurves.density, type: "scatter", mode: "lines", name: `${arm.label} prior`, line: { color: colour, width: 1, dash: "dot" }, visible: "legendonly" });
    if (band && band.armId === arm.armId) data.push(shadeTrace(arm.curves.p, arm.curves.density, band, "Asked interval", `${CAIRN_COLOURS.efficacy}55`, dens));
  });
  const shapes: Record<string, unknown>[] = [];
  if (review.reference.kind === "p0")
    shapes.push({ type: "line", x0: review.reference.value, x1: review.reference.value, yref: "paper", y0: 0, y1: 1, line: { color: CAIRN_COLOURS.futility, dash: "dash", width: 1.5 } });
  const annotations = review.reference.kind === "p0" ? [{ x: review.reference.value, yref: "paper", y: 1, text: `p0 = ${review.reference.value}`, showarrow: false, yanchor: "bottom", font: { color: CAIRN_COLOURS.futility } }] : [];
  return (
    <CairnPlot
      title="Posterior density of the response rate"
      fileName="posterior-density"
      data={data as never}
      layout={{ xaxis: { title: { text: "Response rate" }, range: [0, 1] }, yaxis: { title: { text: "Density" }, rangemode: "tozero" }, shapes: shapes as never, annotations: annotations as never }}
    />
  );
}

export function CumulativePlot({ review }: { review: Pick<Review, "arms" | "reference"> }) {
  const data = review.arms.map((arm, k) => ({ x: arm.curves.p, y: arm.curves.cdf, type: "scatter" as const, mode: "lines" as const, name: `${arm.label}: P(rate ≤ x)`, line: { color: ARM_COLOURS[k] ?? CAIRN_COLOURS.observed, width: 2 } }));
  const shapes = review.reference.kind === "p0" ? [{ type: "line", x0: review.reference.value, x1: review.reference.value, yref: "paper", y0: 0, y1: 1, line: { color: CAIRN_COLOURS.futility, dash: "dash", width: 1.5 } }] : [];
  return <CairnPlot title="Posterior cumulative distribution" fileName="posterior-cumulative" data={data} layout={{ xaxis: { title: { text: "Response rate" }, range: [0, 1] }, yaxis: { title: { text: "Cumulative probability" }, range: [0, 1] }, shapes: shapes as never }} />;
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
  return <CairnPlot title={`${label} at each look`} fileName="predictive-over-looks" data={data as never} layout={{ yaxis: { title: { text: "Probability" }, range: [0, 1.02] } }} />;
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
  return (
    <CairnPlot
      title="Stopping boundaries and the observed path"
      fileName="boundary-chart"
      data={data as never}
      layout={{ xaxis: { title: { text: twoArms ? "Evaluable patients per arm" : "Evaluable patients" }, rangemode: "tozero" }, yaxis: { title: { text: "Cumulative responders" }, rangemode: "tozero" } }}
    />
  );
}

export function DifferencePlot({ grid, delta }: { grid: { d: number[]; density: number[] }; delta: number }) {
  const data = [
    { x: grid.d, y: grid.density, type: "scatter" as const, mode: "lines" as const, name: "Posterior of pT − pC", line: { color: CAIRN_COLOURS.posterior, width: 2 } },
    shadeTrace(grid.d, grid.density, { lower: delta, upper: 1 }, `pT − pC > ${delta}`, `${CAIRN_COLOURS.efficacy}33`, (x) => interpolateDensity(grid.d.map((v) => v + 1), grid.density, x + 1)),
  ];
  return (
    <CairnPlot
      title="Posterior density of the difference in response rates"
      fileName="difference-density"
      data={data}
      layout={{ xaxis: { title: { text: "Experimental minus control" }, range: [-1, 1] }, yaxis: { title: { text: "Density" }, rangemode: "tozero" }, shapes: [{ type: "line", x0: delta, x1: delta, yref: "paper", y0: 0, y1: 1, line: { color: CAIRN_COLOURS.futility, dash: "dash" } }] as never }}
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
      fileName="toxicity-posterior"
      data={data}
      layout={{ xaxis: { title: { text: "Toxicity rate" }, range: [0, 1] }, yaxis: { title: { text: "Density" }, rangemode: "tozero" }, shapes: [{ type: "line", x0: safety.qmax, x1: safety.qmax, yref: "paper", y0: 0, y1: 1, line: { color: CAIRN_COLOURS.safety, dash: "dash" } }] as never }}
    />
  );
}
