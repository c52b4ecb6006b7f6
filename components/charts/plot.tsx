"use client";
/**
 * The one Plotly entry point. Loaded lazily on the client (Plotly needs the DOM); uses the
 * dist-min bundle through react-plotly.js/factory. Every chart offers a PNG download from the mode bar.
 */
import dynamic from "next/dynamic";
import type { PlotParams } from "react-plotly.js";

const Plot = dynamic(
  async () => {
    const [{ default: createPlotlyComponent }, Plotly] = await Promise.all([
      import("react-plotly.js/factory"),
      import("plotly.js-dist-min"),
    ]);
    return createPlotlyComponent((Plotly as { default?: unknown }).default ?? Plotly);
  },
  { ssr: false, loading: () => <p className="text-sm text-stone-500" role="status">Drawing chart…</p> },
);

export const CAIRN_COLOURS = {
  futility: "#9a5b06",
  efficacy: "#17707a",
  safety: "#a02a5a",
  observed: "#1f1d19",
  posterior: "#3f7d4f",
  prior: "#9a9384",
  control: "#5e584c",
} as const;

export function CairnPlot({ data, layout, title, height = 320, fileName = "cairn-chart" }: { data: PlotParams["data"]; layout?: Partial<PlotParams["layout"]>; title: string; height?: number; fileName?: string }) {
  return (
    <figure aria-label={title} className="w-full">
      <Plot
        data={data}
        layout={{
          height,
          autosize: true,
          margin: { l: 56, r: 16, t: 28, b: 48 },
          font: { family: "IBM Plex Sans, system-ui, sans-serif", size: 12, color: "#302d27" },
          paper_bgcolor: "#ffffff",
          plot_bgcolor: "#ffffff",
          legend: { orientation: "h", y: -0.22 },
          ...layout,
        }}
        config={{ displaylogo: false, responsive: true, toImageButtonOptions: { format: "png", filename: fileName, scale: 2 }, modeBarButtonsToRemove: ["lasso2d", "select2d"] }}
        useResizeHandler
        style={{ width: "100%" }}
      />
      <figcaption className="sr-only">{title}</figcaption>
    </figure>
  );
}
