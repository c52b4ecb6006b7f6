"use client";
/**
 * The one Plotly entry point, drawn inside the chart frame (chart-figure.tsx: title, summary,
 * numbers table, download button). Plotly is loaded lazily on the client after first paint
 * (next/dynamic, ssr: false), so it is fetched only by pages that draw a chart, and it is the
 * published partial bundle plotly.js-basic-dist-min (scatter and bar traces: every line, step,
 * area and marker Cairn draws), about a quarter of the full bundle.
 *
 * No Plotly toolbar (displayModeBar: false): besides zoom buttons it can offer to send a chart to
 * a hosted editing service, and an unblinded chart must never leave the browser. Instead each
 * chart has a plain "Download PNG" button that draws the image locally (Plotly.downloadImage).
 */
import dynamic from "next/dynamic";
import { useRef, useState, type ReactNode } from "react";
import type { PlotParams } from "react-plotly.js";
import { ChartFigure, type ChartNumbers } from "@/components/charts/chart-figure";

type PlotlyModule = { downloadImage(gd: HTMLElement, opts: { format: "png"; filename: string; scale: number }): Promise<string> };
const loadPlotly = async (): Promise<PlotlyModule> => {
  const m = (await import("plotly.js-basic-dist-min")) as unknown as { default?: PlotlyModule } & PlotlyModule;
  return m.default ?? m;
};

const Plot = dynamic(
  async () => {
    const [{ default: createPlotlyComponent }, Plotly] = await Promise.all([import("react-plotly.js/factory"), loadPlotly()]);
    return createPlotlyComponent(Plotly as never);
  },
  { ssr: false, loading: () => <p className="text-sm text-stone-600">Drawing chart…</p> },
);

export { CAIRN_COLOURS } from "@/lib/charts/palette";

/** The options every chart gets: no toolbar, no logo link, no hosted-service links, resizing on. */
const CAIRN_PLOT_CONFIG = { displayModeBar: false, displaylogo: false, showLink: false, showEditInChartStudio: false, showSendToCloud: false, responsive: true } as const;

const reducedMotion = () => typeof window !== "undefined" && !!window.matchMedia?.("(prefers-reduced-motion: reduce)").matches;

export function CairnPlot({
  data,
  layout,
  title,
  summary,
  numbers,
  height = 320,
  fileName = "cairn-chart",
}: {
  data: PlotParams["data"];
  layout?: Partial<PlotParams["layout"]>;
  /** Shown above the chart; also the PNG's and the table's name. */
  title: string;
  /** What the chart shows and its key values, in words. */
  summary: ReactNode;
  /** The plotted values as a table ("Show the numbers"). */
  numbers: ChartNumbers;
  height?: number;
  fileName?: string;
}) {
  const graph = useRef<HTMLElement | null>(null);
  const [ready, setReady] = useState(false);
  const [busy, setBusy] = useState(false);
  async function downloadPng() {
    if (!graph.current) return;
    setBusy(true);
    try {
      await (await loadPlotly()).downloadImage(graph.current, { format: "png", filename: fileName, scale: 2 });
    } finally {
      setBusy(false);
    }
  }
  return (
    <ChartFigure title={title} summary={summary} numbers={numbers} onDownload={downloadPng} downloadReady={ready && !busy}>
      <Plot
        data={data}
        layout={{
          height,
          autosize: true,
          // The legend sits above the plot area, so it never collides with the x-axis title.
          margin: { l: 64, r: 24, t: 16, b: 56 },
          font: { family: "IBM Plex Sans, system-ui, sans-serif", size: 12, color: "#302d27" },
          paper_bgcolor: "#ffffff",
          plot_bgcolor: "#ffffff",
          legend: { orientation: "h", x: 0, xanchor: "left", y: 1.02, yanchor: "bottom" },
          transition: reducedMotion() ? { duration: 0 } : undefined,
          ...layout,
        }}
        config={CAIRN_PLOT_CONFIG}
        onInitialized={(_figure, gd) => {
          graph.current = gd;
          setReady(true);
        }}
        useResizeHandler
        style={{ width: "100%" }}
      />
    </ChartFigure>
  );
}
