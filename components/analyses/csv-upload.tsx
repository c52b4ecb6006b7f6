"use client";
/**
 * Patient-level CSV upload in two steps: "Check file" sends it for a preview (nothing is written)
 * and shows the derived counts or every problem by line and column; "Write" sends the same file
 * again, the server checks it again and writes all rows or none.
 */
import type { ArmCounts } from "@/lib/domain";
import { useRef, useState } from "react";
import { useRouter } from "next/navigation";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { MAX_UPLOAD_BYTES, PATIENT_CSV_COLUMNS, tooLargeMessage, type ExcludedRows } from "@/lib/csv/patient-outcomes";
import { callApi, type CsvIssueJson } from "@/lib/api-client";

type PreviewCounts = ArmCounts & { armLabel: string };
type Preview =
  | { ok: true; rowCount: number; includedRows: number; counts: PreviewCounts[]; cutoffDate: string; excluded: ExcludedRows }
  | { ok: false; rowCount: number; issueCount: number; issues: CsvIssueJson[]; excluded?: ExcludedRows };

type Phase =
  | { kind: "idle" }
  | { kind: "busy"; what: string }
  | { kind: "preview"; preview: Preview }
  | { kind: "error"; message: string; issues?: CsvIssueJson[] }
  | { kind: "done"; message: string; excluded?: ExcludedRows };

export function CsvUpload({ trialId, analysisId, rowVersion, safetyRule, cutoffDate }: { trialId: number; analysisId: number; rowVersion: number; safetyRule: boolean; cutoffDate: string | null }) {
  const router = useRouter();
  const input = useRef<HTMLInputElement>(null);
  const [file, setFile] = useState<File | null>(null);
  const [phase, setPhase] = useState<Phase>({ kind: "idle" });
  const url = `/api/trials/${trialId}/analyses/${analysisId}/upload`;

  function pick(f: File | null) {
    setFile(f);
    setPhase(f && f.size > MAX_UPLOAD_BYTES ? { kind: "error", message: tooLargeMessage(f.size) } : { kind: "idle" });
  }

  async function check() {
    if (!file) return setPhase({ kind: "error", message: "Choose a CSV file first." });
    if (file.size > MAX_UPLOAD_BYTES) return setPhase({ kind: "error", message: tooLargeMessage(file.size) });
    setPhase({ kind: "busy", what: "Checking every row…" });
    const r = await callApi<Preview>(`${url}/preview`, { method: "POST", headers: { "Content-Type": "text/csv" }, body: file });
    setPhase(r.ok ? { kind: "preview", preview: r.data } : { kind: "error", message: r.error, issues: r.issues });
  }

  async function confirm() {
    if (!file) return;
    setPhase({ kind: "busy", what: "Writing the patient rows…" });
    const q = new URLSearchParams({ rowVersion: String(rowVersion), fileName: file.name.slice(0, 200) });
    const r = await callApi<{ patientRows: number; enrolledTotal: number; excluded: ExcludedRows }>(`${url}/confirm?${q}`, { method: "POST", headers: { "Content-Type": "text/csv" }, body: file });
    if (!r.ok) return setPhase({ kind: "error", message: r.error, issues: r.issues });
    const left = r.data.excluded.count;
    setPhase({
      kind: "done",
      message: `${r.data.patientRows} patient rows written; counts derived at the cut-off (${r.data.enrolledTotal} enrolled in total).${left ? ` ${left} row${left === 1 ? "" : "s"} enrolled after the cut-off left out.` : ""}`,
      excluded: r.data.excluded,
    });
    setFile(null);
    if (input.current) input.current.value = "";
    router.refresh();
  }

  return (
    <div className="flex flex-col gap-3" aria-label="Upload patient-level data" role="group">
      <p className="text-sm text-stone-700">
        One row per patient with the columns <code>{PATIENT_CSV_COLUMNS.join(", ")}</code> and, optionally, <code>treated</code>. Arm by its label or role; evaluable (for
        response), response, toxicity and treated as yes/no, 1/0 or true/false; response empty for a patient who is not evaluable; evaluable <code>pending</code> (response empty) for a patient who will be evaluable but whose response is not yet known at the cut-off
        {safetyRule
          ? "; toxicity required for every treated patient and empty for one not treated (without a treated column every patient counts as treated)"
          : ""}
        ; dates as YYYY-MM-DD. Patients enrolled after the cut-off{cutoffDate ? ` (${cutoffDate})` : ""} are left out of this look and listed. At most{" "}
        {MAX_UPLOAD_BYTES / (1024 * 1024)} MB.
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <label htmlFor={`csv-${analysisId}`} className="text-sm font-medium text-stone-700">
          Patient CSV file
        </label>
        <input
          ref={input}
          id={`csv-${analysisId}`}
          type="file"
          accept=".csv,text/csv"
          className="text-sm"
          onChange={(e) => pick(e.currentTarget.files?.[0] ?? null)}
        />
        <Button type="button" variant="secondary" onClick={check} disabled={!file || phase.kind === "busy"}>
          Check file
        </Button>
      </div>
      {phase.kind === "busy" ? (
        <p role="status" className="flex items-center gap-2 text-sm text-stone-600">
          <span className="inline-block h-3 w-3 animate-spin rounded-full border-2 border-lichen-600 border-t-transparent" aria-hidden /> {phase.what}
        </p>
      ) : null}
      {phase.kind === "error" ? (
        <>
          <Banner tone="danger" title="Nothing was written">
            {phase.message}
          </Banner>
          {phase.issues?.length ? <IssueTable issues={phase.issues} total={phase.issues.length} /> : null}
        </>
      ) : null}
      {phase.kind === "done" ? (
        <>
          <Banner tone="success">{phase.message}</Banner>
          {phase.excluded?.count ? <ExcludedTable excluded={phase.excluded} /> : null}
        </>
      ) : null}
      {phase.kind === "preview" && !phase.preview.ok ? (
        <>
          <Banner tone="danger" title="The file has problems: nothing was written">
            {phase.preview.issueCount} problem{phase.preview.issueCount === 1 ? "" : "s"} in {phase.preview.rowCount} patient row{phase.preview.rowCount === 1 ? "" : "s"}. Correct the file and check it again.
          </Banner>
          <IssueTable issues={phase.preview.issues} total={phase.preview.issueCount} />
          {phase.preview.excluded?.count ? <ExcludedTable excluded={phase.preview.excluded} /> : null}
        </>
      ) : null}
      {phase.kind === "preview" && phase.preview.ok ? (
        <div className="flex flex-col gap-3">
          <Banner tone="info" title="Preview: nothing is written yet">
            {phase.preview.includedRows} patient rows are valid for this look
            {phase.preview.excluded.count ? `; ${phase.preview.excluded.count} of the file's ${phase.preview.rowCount} rows were enrolled after the cut-off and are left out (listed below)` : ""}.
            Counts at the cut-off {phase.preview.cutoffDate}:
          </Banner>
          <table className="cairn-table" aria-label="Counts derived from the file">
            <thead>
              <tr>
                <th>Arm</th>
                <th>Enrolled</th>
                <th>Evaluable for response</th>
                <th>Responders</th>
                {phase.preview.counts.some((c) => (c.pending ?? 0) > 0) ? <th>Pending (response not yet known)</th> : null}
                {safetyRule ? <th>Treated (evaluable for toxicity)</th> : null}
                {safetyRule ? <th>With toxicity</th> : null}
              </tr>
            </thead>
            <tbody>
              {phase.preview.counts.map((c, _i, all) => (
                <tr key={c.armId}>
                  <td>{c.armLabel}</td>
                  <td>{c.enrolled}</td>
                  <td>{c.evaluable}</td>
                  <td>{c.responders}</td>
                  {all.some((x) => (x.pending ?? 0) > 0) ? <td>{c.pending ?? 0}</td> : null}
                  {safetyRule ? <td>{c.treated ?? "—"}</td> : null}
                  {safetyRule ? <td>{c.toxicities ?? "—"}</td> : null}
                </tr>
              ))}
            </tbody>
          </table>
          <div>
            <Button type="button" onClick={confirm}>
              Write {phase.preview.includedRows} patient rows
            </Button>
          </div>
          {phase.preview.excluded.count ? <ExcludedTable excluded={phase.preview.excluded} /> : null}
        </div>
      ) : null}
    </div>
  );
}

function IssueTable({ issues, total }: { issues: CsvIssueJson[]; total: number }) {
  return (
    <div className="max-h-96 overflow-auto">
      <table className="cairn-table" aria-label="Problems in the file">
        <thead>
          <tr>
            <th>Line</th>
            <th>Column</th>
            <th>What is wrong</th>
          </tr>
        </thead>
        <tbody>
          {issues.map((i, k) => (
            <tr key={k}>
              <td className="tabular-nums">{i.line ?? "file"}</td>
              <td>{i.column ?? "—"}</td>
              <td>{i.message}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {total > issues.length ? <p className="mt-1 text-xs text-stone-500">Showing the first {issues.length} of {total} problems.</p> : null}
    </div>
  );
}

/** The rows left out because the patient was enrolled after the look's data cut-off. */
function ExcludedTable({ excluded }: { excluded: ExcludedRows }) {
  return (
    <div className="max-h-72 overflow-auto">
      <table className="cairn-table" aria-label="Rows left out (enrolled after the cut-off)">
        <caption className="text-left text-sm text-stone-700">
          {excluded.count} row{excluded.count === 1 ? "" : "s"} enrolled after the cut-off {excluded.cutoffDate}, left out of this look
        </caption>
        <thead>
          <tr>
            <th>Line</th>
            <th>Subject</th>
            <th>Enrolled on</th>
          </tr>
        </thead>
        <tbody>
          {excluded.rows.map((r) => (
            <tr key={r.line}>
              <td className="tabular-nums">{r.line}</td>
              <td>{r.subjectId}</td>
              <td>{r.enrolmentDate}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {excluded.count > excluded.rows.length ? <p className="mt-1 text-xs text-stone-500">Showing the first {excluded.rows.length} of {excluded.count} rows left out.</p> : null}
    </div>
  );
}
