"use client";
/**
 * AG Grid itself, loaded only through components/grid/data-grid.tsx (lazily). Registers only the
 * community modules Cairn uses (the core brings the client-side row model, sorting and keyboard
 * navigation): text, number and date column filters and CSV export (cells neutralised against
 * formula injection, lib/csv/formula-injection.ts). No Google-font parameters (no outside requests).
 *
 * Keyboard: the grid is one Tab stop. Arrow keys move between headers and cells; Tab and Shift+Tab
 * leave the grid for the next or previous control of the page instead of walking every cell
 * (WCAG 2.1.1, 2.4.3). The focused header or cell has a 3 px ring (globals.css, .cairn-grid).
 */
import { useMemo, useRef, type KeyboardEvent } from "react";
import { AgGridReact } from "ag-grid-react";
import { CsvExportModule, DateFilterModule, ModuleRegistry, NumberFilterModule, TextFilterModule, themeQuartz, type ColDef } from "ag-grid-community";
import { Button } from "@/components/ui/button";
import { safeCsvExportParams } from "@/lib/csv/formula-injection";
import type { DataGridProps } from "./data-grid";

ModuleRegistry.registerModules([TextFilterModule, NumberFilterModule, DateFilterModule, CsvExportModule]);

const cairnTheme = themeQuartz.withParams({
  fontFamily: "inherit",
  headerFontWeight: 600,
  accentColor: "#3f7d4f",
  borderColor: "#dcd8cd",
  headerBackgroundColor: "#f7f6f3",
  foregroundColor: "#1f1d19",
  rowHoverColor: "#eef6ef",
});

const TABBABLE = 'a[href], button:not([disabled]), input:not([disabled]):not([type="hidden"]), select:not([disabled]), textarea:not([disabled]), summary, [tabindex]:not([tabindex="-1"])';

/** The next (or previous) control of the page outside `container`, in document order. */
function tabbableOutside(container: HTMLElement, forward: boolean): HTMLElement | null {
  const all = [...document.querySelectorAll<HTMLElement>(TABBABLE)].filter((el) => !container.contains(el) && el.tabIndex >= 0 && el.getClientRects().length > 0);
  const after = (el: HTMLElement) => !!(container.compareDocumentPosition(el) & Node.DOCUMENT_POSITION_FOLLOWING);
  return forward ? (all.find(after) ?? null) : ([...all].reverse().find((el) => !after(el)) ?? null);
}

export function AgDataGrid<T extends object>({ rows, columns, label, height = 420, csvFileName }: DataGridProps<T>) {
  const ref = useRef<AgGridReact<T>>(null);
  const box = useRef<HTMLDivElement>(null);
  const defaultColDef = useMemo<ColDef<T>>(() => ({ sortable: true, filter: true, resizable: true, flex: 1, minWidth: 90 }), []);
  function leaveOnTab(e: KeyboardEvent<HTMLDivElement>) {
    if (e.key !== "Tab" || e.altKey || e.ctrlKey || e.metaKey || !box.current) return;
    // Inside an open filter menu Tab keeps its usual meaning (moving between the menu's fields).
    if ((e.target as HTMLElement).closest(".ag-popup, .ag-menu, .ag-filter")) return;
    const next = tabbableOutside(box.current, !e.shiftKey);
    if (!next) return;
    e.preventDefault();
    e.stopPropagation();
    next.focus();
  }
  return (
    <div className="flex flex-col gap-2">
      {csvFileName ? (
        <div className="flex justify-end">
          <Button variant="secondary" type="button" onClick={() => ref.current?.api.exportDataAsCsv(safeCsvExportParams(csvFileName))}>
            Export CSV
          </Button>
        </div>
      ) : null}
      <div ref={box} role="region" aria-label={label} style={{ height }} className="cairn-grid" onKeyDownCapture={leaveOnTab}>
        <AgGridReact<T> ref={ref} theme={cairnTheme} rowData={rows} columnDefs={columns} defaultColDef={defaultColDef} animateRows={false} ensureDomOrder />
      </div>
    </div>
  );
}
