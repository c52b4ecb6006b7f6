"use client";
/**
 * The one Plotly entry point. Loaded lazily on the client (Plotly needs the DOM); uses the
 * dist-min bundle through react-plotly.js/factory.
 *
 * No Plotly toolbar (displayModeBar: false): besides zoom buttons it can offer to send a chart to
 * a hosted editing service, and an unblinded chart must never leave the browser. Instead each
 * chart has a plain "Download PNG" button that draws the image locally (Plotly.downloadImage).
 */
import dynamic from "next/dynamic";
import { useRef, useState } from "react";
import type { PlotParams } from "react-plotly.js";
import { Button } from "@/components/ui/button";

type PlotlyModule = { downloadImage(gd: HTMLElement, opts: { format: "png"; filename: string; scale: number }): Promise<string> };
const loadPlotly = async (): Promise<PlotlyModule> => {
  const m = (await import("plotly.js-dist-min")) as unknown as { default?: PlotlyModule } & PlotlyModule;
  return m.default ?? m;
};

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

/** The options every chart gets: no toolbar, no logo link, no hosted-service links, resizing on. */
export const CAIRN_PLOT_CONFIG = { displayModeBar: false, displaylogo: false, showLink: false, showEditInChartStudio: false, showSendToCloud: false, responsive: true } as const;

export function CairnPlot({ data, layout, title, height = 320, fileName = "cairn-chart" }: { data: PlotParams["data"]; layout?: Partial<PlotParams["layout"]>; title: string; height?: number; fileName?: string }) {
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
    <figure aria-label={title} className="w-full">
      <div className="flex justify-end">
        <Button variant="secondary" type="button" onClick={downloadPng} disabled={!ready || busy} aria-label={`Download PNG: ${title}`}>
          Download PNG
        </Button>
      </div>
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
        config={CAIRN_PLOT_CONFIG}
        onInitialized={(_figure, gd) => {
          graph.current = gd;
          setReady(true);
        }}
        useResizeHandler
        style={{ width: "100%" }}
      />
      <figcaption className="sr-only">{title}</figcaption>
    </figure>
  );
}
