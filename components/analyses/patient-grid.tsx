"use client";
import type { ColDef } from "ag-grid-community";
import { DataGrid } from "@/components/grid/data-grid";
import type { PatientJson } from "@/lib/analyses/json";

const yesNo = (v: boolean | null | undefined) => (v === null || v === undefined ? "" : v ? "yes" : "no");

/** CLOSED: patient-level rows of one look (sort, filter, CSV export). */
export function PatientGrid({ rows, fileName }: { rows: PatientJson[]; fileName: string }) {
  const columns: ColDef<PatientJson>[] = [
    { field: "line", headerName: "Line", maxWidth: 90 },
    { field: "subjectId", headerName: "Subject" },
    { field: "arm", headerName: "Arm" },
    { field: "enrolmentDate", headerName: "Enrolled on" },
    // Text, not checkboxes: an empty response (not evaluable) must not look like "no".
    { colId: "evaluable", headerName: "Evaluable for response", cellDataType: "text", valueGetter: (p) => (p.data?.pending ? "pending" : yesNo(p.data?.evaluable)) },
    { colId: "responder", headerName: "Response", cellDataType: "text", valueGetter: (p) => yesNo(p.data?.responder) },
    { colId: "treated", headerName: "Treated", cellDataType: "text", valueGetter: (p) => yesNo(p.data?.treated) },
    { colId: "toxicity", headerName: "Toxicity", cellDataType: "text", valueGetter: (p) => yesNo(p.data?.toxicity) },
  ];
  return <DataGrid rows={rows} columns={columns} label="Patient-level rows" csvFileName={fileName} height={360} />;
}
