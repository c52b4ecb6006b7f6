import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { allows, authorizePage, closedConnection } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { HttpError } from "@/lib/http";
import { ANALYSIS_STATUS_LABELS, formatRate } from "@/lib/format";
import { armCountsOf, fetchArmCounts, fetchPatientOutcomeGrid } from "@/db/queries/closed";
import { fetchLockSignature } from "@/db/queries/analyses";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { Banner } from "@/components/ui/banner";
import { STATUS_TONES } from "@/components/analyses/status";
import { CountsForm, LockForm, OpenLookForm, ReopenForm, SwitchToCountLevelForm } from "@/components/analyses/look-forms";
import { CsvUpload } from "@/components/analyses/csv-upload";
import { PatientGrid } from "@/components/analyses/patient-grid";
import { loadLookContext, type LookContext } from "@/lib/analyses/service";
import { patientJson } from "@/lib/analyses/json";

export const metadata: Metadata = { title: "Interim look" };

export default async function LookPage({ params }: { params: Promise<{ trialId: string; analysisId: string }> }) {
  const p = await params;
  const trialId = parseId(p.trialId);
  const analysisId = parseId(p.analysisId);
  const access = await authorizePage(trialId, "enterData");
  const { trial, user } = access;
  let look: LookContext;
  try {
    look = await loadLookContext(trial.id, analysisId);
  } catch (e) {
    if (e instanceof HttpError && e.status === 404) notFound();
    throw e;
  }
  const a = look.analysis;
  // Closed data: this page is reachable only with enterData (unblinded statistician).
  const [counts, patients, signature] = await Promise.all([
    fetchArmCounts(a.id, closedConnection(access)),
    fetchPatientOutcomeGrid(a.id, closedConnection(access)),
    a.status === "locked" || a.status === "reviewed" ? fetchLockSignature(a.id) : Promise.resolve(undefined),
  ]);
  const countValues = counts.map(armCountsOf);
  const patientLevel = patients.length > 0;
  const arms = look.arms.map((x) => ({ id: x.id, label: x.label, role: x.arm_role }));
  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm">
        <Link href={`/trials/${trial.id}/analyses`}>← All looks</Link>
      </p>
      <Card title={`Look ${a.look_number}`} actions={<Badge tone={STATUS_TONES[a.status]}>{ANALYSIS_STATUS_LABELS[a.status]}</Badge>}>
        <dl className="grid grid-cols-2 gap-x-6 gap-y-2 text-sm sm:grid-cols-4" data-testid="look-summary">
          <div>
            <dt className="text-stone-500">Planned size{trial.design_type === "two" ? " (per arm)" : ""}</dt>
            <dd className="font-medium tabular-nums">{a.planned_n}</dd>
          </div>
          <div>
            <dt className="text-stone-500">Data cut-off</dt>
            <dd className="font-medium" data-testid="look-cutoff">{a.cutoff_date ?? "not set"}</dd>
          </div>
          <div>
            <dt className="text-stone-500">Enrolled (pooled)</dt>
            <dd className="font-medium tabular-nums" data-testid="look-enrolled-total">{a.enrolled_total ?? "—"}</dd>
          </div>
          <div>
            <dt className="text-stone-500">Amendments</dt>
            <dd className="font-medium tabular-nums">{a.amendment_count}</dd>
          </div>
        </dl>
        {signature ? (
          <p className="mt-3 text-sm text-stone-700" data-testid="lock-signature">
            Signed by {signature.signerName} ({signature.meaning}) at {new Date(signature.signedAt).toISOString().replace("T", " ").slice(0, 19)} UTC.
          </p>
        ) : null}
      </Card>

      {counts.length ? (
        <Card title="Counts at the cut-off">
          <table className="cairn-table" aria-label="Recorded counts">
            <thead>
              <tr>
                <th scope="col">Arm</th>
                <th scope="col">Enrolled</th>
                <th scope="col">Evaluable for response</th>
                <th scope="col">Responders</th>
                <th scope="col">Observed response rate</th>
                {look.safetyRule ? <th scope="col">Treated (evaluable for toxicity)</th> : null}
                {look.safetyRule ? <th scope="col">With toxicity</th> : null}
              </tr>
            </thead>
            <tbody>
              {look.arms.map((arm) => {
                const c = counts.find((x) => x.arm_id === arm.id);
                return (
                  <tr key={arm.id} data-testid={`recorded-${arm.arm_role}`}>
                    <th scope="row" className="text-left font-medium">{arm.label}</th>
                    <td data-testid="enrolled">{c?.enrolled ?? "—"}</td>
                    <td data-testid="evaluable">{c?.evaluable ?? "—"}</td>
                    <td data-testid="responders">{c?.responders ?? "—"}</td>
                    <td>{c && c.evaluable > 0 ? formatRate(c.responders / c.evaluable) : "—"}</td>
                    {look.safetyRule ? <td data-testid="treated">{c?.treated ?? "—"}</td> : null}
                    {look.safetyRule ? <td data-testid="toxicities">{c?.toxicities ?? "—"}</td> : null}
                  </tr>
                );
              })}
            </tbody>
          </table>
          <p className="mt-2 text-xs text-stone-500" data-testid="data-level">
            {patientLevel ? `Patient-level: derived from ${patients.length} uploaded patient rows.` : "Count-level: entered by hand."}
          </p>
        </Card>
      ) : null}

      {a.status === "planned" ? (
        <Card title="Open this look for entry">
          <OpenLookForm trialId={trial.id} analysisId={a.id} rowVersion={a.row_version} lookNumber={a.look_number} />
        </Card>
      ) : null}

      {a.status === "open" ? (
        <>
          {a.amendment_count > 0 ? <Banner tone="warning" title={`Amendment ${a.amendment_count}`}>This look was reopened for a correction. Changes are recorded with their old values in the audit trail.</Banner> : null}
          {patientLevel ? (
            <Card title="Counts come from the patient rows">
              <SwitchToCountLevelForm trialId={trial.id} analysisId={a.id} rowVersion={a.row_version} patientRows={patients.length} />
            </Card>
          ) : (
            <Card title="Enter counts by hand">
              <CountsForm
                trialId={trial.id}
                analysisId={a.id}
                rowVersion={a.row_version}
                cutoffDate={a.cutoff_date}
                arms={arms}
                safetyRule={look.safetyRule}
                counts={countValues}
                amendment={a.amendment_count}
                maxPerArm={look.maxPerArm}
              />
            </Card>
          )}
          <Card title={patientLevel ? "Upload a corrected patient-level file (CSV)" : "Or upload patient-level data (CSV)"}>
            <CsvUpload trialId={trial.id} analysisId={a.id} rowVersion={a.row_version} safetyRule={look.safetyRule} cutoffDate={a.cutoff_date} />
          </Card>
          <Card title="Lock this look">
            {counts.length === look.arms.length ? (
              <LockForm trialId={trial.id} analysisId={a.id} rowVersion={a.row_version} lookNumber={a.look_number} signerName={user.name} />
            ) : (
              <p className="text-sm text-stone-600">Enter or upload counts for every arm before locking.</p>
            )}
          </Card>
        </>
      ) : null}

      {a.status === "locked" ? (
        <Banner tone="success" title={`Look ${a.look_number} is locked and signed`}>
          <p data-testid="lock-confirmation">
            Its counts are now the record of look {a.look_number}{signature ? `, signed by ${signature.signerName}` : ""}. The DMC reviews it next.
            {allows(access.principal, "viewClosed") ? (
              <>
                {" "}
                <Link href={`/trials/${trial.id}/review/${a.id}`}>Open the closed review of look {a.look_number}</Link>
              </>
            ) : null}
          </p>
        </Banner>
      ) : null}
      {a.status === "locked" ? (
        <Card title="Correct this look">
          <ReopenForm trialId={trial.id} analysisId={a.id} rowVersion={a.row_version} lookNumber={a.look_number} />
        </Card>
      ) : null}
      {a.status === "reviewed" ? <Banner tone="info">The DMC has reviewed this look. A correction now needs your e-signature and starts a new review version: reopen it from the look&apos;s closed review page.</Banner> : null}

      {patients.length ? (
        <Card title="Patient-level rows">
          <PatientGrid rows={patients.map(patientJson)} fileName={`${trial.code}-look-${a.look_number}-patients.csv`} />
        </Card>
      ) : null}
    </div>
  );
}
