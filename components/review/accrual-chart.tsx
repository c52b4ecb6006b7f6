"use client";
/**
 * OPEN chart: pooled enrolment at each data cut-off against the target. Takes only open numbers
 * (dates and pooled counts); imported by the open status page, so it must never import closed code.
 */
import { CairnPlot, CAIRN_COLOURS } from "@/components/charts/plot";

export function AccrualChart({ points, target, firstPatientOn }: { points: { date: string; enrolled: number; look: number }[]; target: number; firstPatientOn: string | null }) {
  const xs = [...(firstPatientOn ? [firstPatientOn] : []), ...points.map((p) => p.date)];
  const ys = [...(firstPatientOn ? [0] : []), ...points.map((p) => p.enrolled)];
  const ends = xs.length ? [xs[0], xs[xs.length - 1]] : [];
  return (
    <CairnPlot
      title="Accrual over time, pooled across arms"
      fileName="accrual"
      height={280}
      data={[
        { x: xs, y: ys, type: "scatter", mode: "lines+markers", name: "Enrolled (pooled) at each data cut-off", line: { color: CAIRN_COLOURS.posterior, width: 2 }, text: [...(firstPatientOn ? ["first patient"] : []), ...points.map((p) => `look ${p.look}`)] },
        { x: ends, y: ends.map(() => target), type: "scatter", mode: "lines", name: `Target ${target}`, line: { color: CAIRN_COLOURS.prior, dash: "dash" } },
      ]}
      layout={{ xaxis: { title: { text: "Date" }, type: "date" }, yaxis: { title: { text: "Patients enrolled" }, rangemode: "tozero" } }}
    />
  );
}
