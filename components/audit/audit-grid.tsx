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
import { actionWords, actorWords, changeWords, recordWords } from "@/lib/audit/audit-words";

type Row = AuditEntryJson & { when: string; who: string; what: string; record: string; visibilityWord: string; change: string };

function formatAuditTime(iso: string): string {
  return format(new Date(iso), "yyyy-MM-dd HH:mm:ss xxx");
}

export function AuditGrid({ entries, openOnly, trialCode }: { entries: AuditEntryJson[]; openOnly: boolean; trialCode: string }) {
  const zone = useBrowserTimeZone();
  const [action, setAction] = useState("");
  const [visibility, setVisibility] = useState("");
  const [text, setText] = useState("");

  // Formatted only after mount (zone known), so the server's time zone never leaks into the page.
  const rows: Row[] = useMemo(
    () =>
      entries.map((e) => ({
        ...e,
        when: zone ? formatAuditTime(e.occurredAt) : "",
        who: actorWords(e.actorEmail),
        what: actionWords(e.action),
        record: recordWords(e.entityType),
        visibilityWord: e.visibility === "closed" ? "Closed" : "Open",
        change: changeWords(e.oldValues, e.newValues).join("; "),
      })),
    [entries, zone],
  );
  const actions = useMemo(() => [...new Set(entries.map((e) => e.action))].sort((a, b) => actionWords(a).localeCompare(actionWords(b))), [entries]);
  const shown = useMemo(() => {
    const t = text.trim().toLowerCase();
    return rows.filter(
      (r) =>
        (!action || r.action === action) &&
        (!visibility || r.visibility === visibility) &&
        (!t || [r.who, r.what, r.record, r.entityId, r.reason, r.change].some((x) => x && String(x).toLowerCase().includes(t))),
    );
  }, [rows, action, visibility, text]);

  // Full words in the headers: the grid's columns are wide enough for them (no "#" or abbreviations).
  const columns: ColDef<Row>[] = [
    { field: "id", headerName: "Entry", minWidth: 120, sort: "desc" },
    { field: "when", headerName: "When", minWidth: 235 },
    { field: "who", headerName: "Who", minWidth: 200 },
    { field: "what", headerName: "What happened", minWidth: 220 },
    { field: "record", headerName: "Record", minWidth: 130 },
    { field: "entityId", headerName: "Record number", minWidth: 170, wrapHeaderText: true, autoHeaderHeight: true },
    { field: "visibilityWord", headerName: "Visibility", minWidth: 130 },
    { field: "reason", headerName: "Reason", minWidth: 160 },
    { field: "change", headerName: "Change (old → new)", minWidth: 360, wrapText: true, autoHeight: true },
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
              <option key={a} value={a}>{actionWords(a)}</option>
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
