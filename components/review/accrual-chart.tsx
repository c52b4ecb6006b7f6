"use client";
/**
 * OPEN chart: pooled enrolment at each data cut-off against the target. Takes only open numbers
 * (dates and pooled counts); imported by the open status page, so it must never import closed code.
 */
import { CairnPlot, CAIRN_COLOURS } from "@/components/charts/plot";
import { countAxis } from "@/lib/charts/chart-numbers";

export function AccrualChart({ points, target, firstPatientOn }: { points: { date: string; enrolled: number; look: number }[]; target: number; firstPatientOn: string | null }) {
  const xs = [...(firstPatientOn ? [firstPatientOn] : []), ...points.map((p) => p.date)];
  const ys = [...(firstPatientOn ? [0] : []), ...points.map((p) => p.enrolled)];
  const ends = xs.length ? [xs[0], xs[xs.length - 1]] : [];
  return (
    <CairnPlot
      title="Accrual over time, pooled across arms"
      summary={
        points.length
          ? `${points[points.length - 1].enrolled} of the target ${target} patients enrolled by ${points[points.length - 1].date} (look ${points[points.length - 1].look})${firstPatientOn ? `; first patient on ${firstPatientOn}` : ""}.`
          : `No data cut-off yet; the target is ${target} patients.`
      }
      numbers={{
        columns: ["Date", "Event", "Patients enrolled (pooled)"],
        rows: [...(firstPatientOn ? [[firstPatientOn, "First patient", 0]] : []), ...points.map((p) => [p.date, `Look ${p.look} data cut-off`, p.enrolled])],
        note: `Target: ${target} patients.`,
      }}
      fileName="accrual"
      height={280}
      data={[
        { x: xs, y: ys, type: "scatter", mode: "lines+markers", name: "Enrolled (pooled) at each data cut-off", line: { color: CAIRN_COLOURS.posterior, width: 2 }, text: [...(firstPatientOn ? ["first patient"] : []), ...points.map((p) => `look ${p.look}`)] },
        { x: ends, y: ends.map(() => target), type: "scatter", mode: "lines", name: `Target ${target}`, line: { color: CAIRN_COLOURS.prior, dash: "dash" } },
      ]}
      layout={{ xaxis: { title: { text: "Date of data cut-off" }, type: "date", automargin: true }, yaxis: countAxis("Patients enrolled, pooled (count)", Math.max(target, ...ys)) }}
    />
  );
}
