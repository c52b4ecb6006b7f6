"use client";
import { useBrowserTimeZone } from "@/components/ui/use-browser-time-zone";
/**
 * The audit trail grid. Times arrive as UTC ISO strings and are shown in the viewer's own time
 * zone (date-fns in the browser), with the zone named above the grid.
 */
import { useMemo, useState } from "react";
import type { ColDef } from "ag-grid-community";
import { format } from "date-fns";
import { DataGrid } from "@/components/grid/data-grid";
import { SelectInput, TextInput } from "@/components/ui/field";
import type { AuditEntryJson } from "@/lib/audit/audit-json";

type Row = AuditEntryJson & { when: string; oldText: string; newText: string };

const compact = (v: unknown) => (v === null || v === undefined ? "" : JSON.stringify(v));

export function formatAuditTime(iso: string): string {
  return format(new Date(iso), "yyyy-MM-dd HH:mm:ss xxx");
}

export function AuditGrid({ entries, openOnly, trialCode }: { entries: AuditEntryJson[]; openOnly: boolean; trialCode: string }) {
  const zone = useBrowserTimeZone();
  const [action, setAction] = useState("");
  const [visibility, setVisibility] = useState("");
  const [text, setText] = useState("");

  // Formatted only after mount (zone known), so the server's time zone never leaks into the page.
  const rows: Row[] = useMemo(
    () => entries.map((e) => ({ ...e, when: zone ? formatAuditTime(e.occurredAt) : "", oldText: compact(e.oldValues), newText: compact(e.newValues) })),
    [entries, zone],
  );
  const actions = useMemo(() => [...new Set(entries.map((e) => e.action))].sort(), [entries]);
  const shown = useMemo(() => {
    const t = text.trim().toLowerCase();
    return rows.filter(
      (r) =>
        (!action || r.action === action) &&
        (!visibility || r.visibility === visibility) &&
        (!t || [r.actorEmail, r.action, r.entityType, r.entityId, r.reason, r.oldText, r.newText].some((x) => x && String(x).toLowerCase().includes(t))),
    );
  }, [rows, action, visibility, text]);

  const columns: ColDef<Row>[] = [
    { field: "id", headerName: "#", maxWidth: 80, sort: "desc" },
    { field: "when", headerName: "When", minWidth: 235 },
    { field: "actorEmail", headerName: "Who", minWidth: 180 },
    { field: "action", headerName: "What", minWidth: 180 },
    { field: "entityType", headerName: "Record", maxWidth: 140 },
    { field: "entityId", headerName: "Record id", maxWidth: 110 },
    { field: "visibility", headerName: "Visibility", maxWidth: 120 },
    { field: "reason", headerName: "Why", minWidth: 160 },
    { field: "oldText", headerName: "Old values", minWidth: 220 },
    { field: "newText", headerName: "New values", minWidth: 260 },
  ];

  return (
    <div className="flex flex-col gap-3">
      <p className="text-xs text-stone-500" data-testid="audit-zone">
        Times are stored in UTC and shown in your time zone{zone ? ` (${zone})` : ""}.
        {openOnly ? " Your role is blinded: entries about arm-level or outcome data are not shown." : ""}
      </p>
      <div className="flex flex-wrap items-end gap-3" role="search" aria-label="Filter the audit trail">
        <div className="flex flex-col gap-1 text-sm">
          <label htmlFor="audit-filter-action" className="font-medium text-stone-700">Action</label>
          <SelectInput id="audit-filter-action" value={action} onChange={(e) => setAction(e.target.value)}>
            <option value="">All actions</option>
            {actions.map((a) => (
              <option key={a} value={a}>{a}</option>
            ))}
          </SelectInput>
        </div>
        {!openOnly ? (
          <div className="flex flex-col gap-1 text-sm">
            <label htmlFor="audit-filter-visibility" className="font-medium text-stone-700">Visibility</label>
            <SelectInput id="audit-filter-visibility" value={visibility} onChange={(e) => setVisibility(e.target.value)}>
              <option value="">Open and closed</option>
              <option value="open">Open only</option>
              <option value="closed">Closed only</option>
            </SelectInput>
          </div>
        ) : null}
        <div className="flex flex-col gap-1 text-sm">
          <label htmlFor="audit-filter-text" className="font-medium text-stone-700">Contains</label>
          <TextInput id="audit-filter-text" value={text} onChange={(e) => setText(e.target.value)} placeholder="person, record, value…" />
        </div>
        <p className="text-xs text-stone-500" aria-live="polite">
          {shown.length} of {rows.length} entries
        </p>
      </div>
      <DataGrid rows={shown} columns={columns} label="Audit trail entries" csvFileName={`${trialCode}-audit-trail.csv`} height={520} />
    </div>
  );
}
