/**
 * The frame every chart in Cairn is drawn in: a visible title, a short text summary with the key
 * values, the drawing itself (hidden from assistive technology, because the summary and the table
 * carry the same information), a "Show the numbers" table of the plotted values, and one
 * "Download PNG" button. A screen-reader or keyboard user gets everything the picture shows without
 * reaching into the drawing (WCAG 1.1.1, 1.3.1; the chart library's own toolbar is never shown).
 *
 * No "use client" of its own: it holds no state; the download button's handler comes from the
 * client component that owns the drawing (components/charts/plot.tsx).
 */
import { useId, type ReactNode } from "react";
import { Button } from "@/components/ui/button";

type ChartCell = string | number | null;
/** The plotted values as a table: one header per column, rows already rounded for display. */
export type ChartNumbers = { columns: string[]; rows: ChartCell[][]; note?: string };

export function ChartFigure({
  title,
  summary,
  numbers,
  onDownload,
  downloadReady,
  children,
}: {
  title: string;
  summary: ReactNode;
  numbers: ChartNumbers;
  onDownload: () => void;
  downloadReady: boolean;
  children: ReactNode;
}) {
  const id = useId();
  return (
    <figure className="flex w-full min-w-0 flex-col gap-2" aria-labelledby={`${id}-title`} aria-describedby={`${id}-summary`} data-chart="">
      <figcaption className="flex flex-col gap-1">
        <span id={`${id}-title`} className="text-sm font-semibold text-stone-900" data-chart-title="">
          {title}
        </span>
        <span id={`${id}-summary`} className="text-sm text-stone-700" data-chart-summary="">
          {summary}
        </span>
      </figcaption>
      <div aria-hidden="true" className="min-w-0">
        {children}
      </div>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <details className="min-w-0 flex-1" data-chart-numbers="">
          <summary className="cursor-pointer text-sm font-medium text-lichen-700 underline underline-offset-2">Show the numbers</summary>
          <div className="mt-2 max-h-96 overflow-auto" tabIndex={0} role="region" aria-label={`Numbers: ${title}`}>
            <table className="cairn-table">
              <caption className="sr-only">{title}</caption>
              <thead>
                <tr>
                  {numbers.columns.map((c) => (
                    <th key={c} scope="col">
                      {c}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {numbers.rows.map((r, i) => (
                  <tr key={i}>
                    {r.map((cell, j) => (
                      <td key={j}>{cell === null ? "—" : cell}</td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
            {numbers.note ? <p className="mt-1 text-xs text-stone-600">{numbers.note}</p> : null}
          </div>
        </details>
        <Button variant="secondary" type="button" onClick={onDownload} disabled={!downloadReady} aria-label={`Download PNG: ${title}`}>
          Download PNG
        </Button>
      </div>
    </figure>
  );
}
