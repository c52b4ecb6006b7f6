"use client";
/**
 * The one AG Grid entry point. The grid's code (ag-grid-community and ag-grid-react, about a third
 * of a megabyte gzipped with every module) is loaded after first paint and only on pages that show
 * a grid (next/dynamic, ssr: false); until then a quiet placeholder of the grid's height holds the
 * space so nothing jumps. The grid itself lives in ag-data-grid.tsx.
 */
import dynamic from "next/dynamic";
import type { ColDef } from "ag-grid-community";

export type DataGridProps<T extends object> = {
  rows: T[];
  columns: ColDef<T>[];
  label: string;
  height?: number;
  csvFileName?: string;
};

const LazyGrid = dynamic(() => import("./ag-data-grid").then((m) => m.AgDataGrid), {
  ssr: false,
  loading: () => <p className="text-sm text-stone-600">Loading the table…</p>,
});

export function DataGrid<T extends object>(props: DataGridProps<T>) {
  return (
    <div style={{ minHeight: (props.height ?? 420) + (props.csvFileName ? 44 : 0) }}>
      <LazyGrid {...(props as unknown as DataGridProps<object>)} />
    </div>
  );
}
