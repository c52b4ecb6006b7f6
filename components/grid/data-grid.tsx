"use client";
/**
 * The one AG Grid entry point: community modules registered once, Cairn's theme colours, sorting
 * and filtering on, CSV export (cells neutralised against formula injection, lib/csv/formula-injection.ts).
 * No Google-font parameters (no outside requests).
 */
import { useMemo, useRef } from "react";
import { AgGridReact } from "ag-grid-react";
import { AllCommunityModule, ModuleRegistry, themeQuartz, type ColDef } from "ag-grid-community";
import { Button } from "@/components/ui/button";
import { safeCsvExportParams } from "@/lib/csv/formula-injection";

ModuleRegistry.registerModules([AllCommunityModule]);

const cairnTheme = themeQuartz.withParams({
  fontFamily: "inherit",
  headerFontWeight: 600,
  accentColor: "#3f7d4f",
  borderColor: "#dcd8cd",
  headerBackgroundColor: "#f7f6f3",
  foregroundColor: "#1f1d19",
  rowHoverColor: "#eef6ef",
});

export function DataGrid<T extends object>({
  rows,
  columns,
  label,
  height = 420,
  csvFileName,
}: {
  rows: T[];
  columns: ColDef<T>[];
  label: string;
  height?: number;
  csvFileName?: string;
}) {
  const ref = useRef<AgGridReact<T>>(null);
  const defaultColDef = useMemo<ColDef<T>>(() => ({ sortable: true, filter: true, resizable: true, flex: 1, minWidth: 90 }), []);
  return (
    <div className="flex flex-col gap-2">
      {csvFileName ? (
        <div className="flex justify-end">
          <Button variant="secondary" type="button" onClick={() => ref.current?.api.exportDataAsCsv(safeCsvExportParams(csvFileName))}>
            Export CSV
          </Button>
        </div>
      ) : null}
      <div role="region" aria-label={label} style={{ height }}>
        <AgGridReact<T> ref={ref} theme={cairnTheme} rowData={rows} columnDefs={columns} defaultColDef={defaultColDef} animateRows={false} />
      </div>
    </div>
  );
}
