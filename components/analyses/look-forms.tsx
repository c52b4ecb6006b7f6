"use client";
/**
 * The forms of one look: open it for entry, enter counts per arm, lock with an e-signature, reopen
 * as an amendment. Each posts JSON to the interim data API; the row version the page was rendered
 * with travels in a hidden input, so a save over someone else's newer save is refused (409).
 */
import type { ArmCounts } from "@/lib/domain";
import { startTransition, useActionState, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { Field, TextArea, TextInput } from "@/components/ui/field";
import { callApi, jsonInit, type ApiFailure } from "@/lib/api-client";
import { CLOSED_FIELD_NOTE } from "@/lib/field-visibility";
import { FocusFirstInvalid } from "@/components/ui/focus-first-invalid";
import { fieldName } from "@/lib/form-errors";

type FormState = { ok?: string; failure?: ApiFailure };
const initial: FormState = {};

type ArmInput = { id: number; label: string; role: string };
/** Two denominators: evaluable (for response) and treated (evaluable for toxicity, with a safety rule only). */
type CountsValue = ArmCounts;

/**
 * Submits through the action without React's automatic form reset, so what the user typed stays in
 * the inputs next to its error messages.
 */
function keepValues(action: (fd: FormData) => void) {
  return (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const fd = new FormData(e.currentTarget);
    startTransition(() => action(fd));
  };
}

const base = (trialId: number, analysisId: number) => `/api/trials/${trialId}/analyses/${analysisId}`;

function Outcome({ state }: { state: FormState }) {
  if (state.ok) return <Banner tone="success">{state.ok}</Banner>;
  if (!state.failure) return null;
  const f = state.failure;
  return (
    <Banner tone="danger" title={f.status === 409 ? "Not saved: conflict" : "Not saved"}>
      <p>{f.error}</p>
      {Object.keys(f.fieldErrors).length && !f.error.startsWith("Check ") ? (
        <ul className="mt-1 list-disc pl-5" data-testid="form-error-summary">
          {Object.entries(f.fieldErrors).map(([k, m]) => (
            <li key={k}>{fieldName(k)}: {m}</li>
          ))}
        </ul>
      ) : null}
      {f.status === 409 ? (
        <button type="button" className="mt-1 underline" onClick={() => window.location.reload()}>
          Reload this look
        </button>
      ) : null}
    </Banner>
  );
}

export function OpenLookForm({ trialId, analysisId, rowVersion, lookNumber }: { trialId: number; analysisId: number; rowVersion: number; lookNumber: number }) {
  const router = useRouter();
  const [state, action, pending] = useActionState(async (_p: FormState, fd: FormData): Promise<FormState> => {
    const r = await callApi(`${base(trialId, analysisId)}/open`, jsonInit("POST", { rowVersion: fd.get("rowVersion"), cutoffDate: fd.get("cutoffDate") }));
    if (!r.ok) return { failure: r };
    router.refresh();
    return { ok: `Look ${lookNumber} is open for entry.` };
  }, initial);
  const fe = state.failure?.fieldErrors ?? {};
  return (
    <form noValidate onSubmit={keepValues(action)} className="flex flex-col gap-3" aria-label="Open this look for entry">
      <FocusFirstInvalid after={state} />
      <Outcome state={state} />
      <input type="hidden" name="rowVersion" value={rowVersion} />
      <Field label="Data cut-off date" name="cutoffDate" error={fe.cutoffDate} hint="Patients enrolled on or before this date belong to this look.">
        <TextInput id="cutoffDate" name="cutoffDate" type="date" required invalid={!!fe.cutoffDate} />
      </Field>
      <div>
        <Button type="submit" disabled={pending}>{pending ? "Opening…" : "Open for entry"}</Button>
      </div>
    </form>
  );
}

export function CountsForm({
  trialId,
  analysisId,
  rowVersion,
  cutoffDate,
  arms,
  safetyRule,
  counts,
  amendment,
  maxPerArm,
}: {
  trialId: number;
  analysisId: number;
  rowVersion: number;
  cutoffDate: string | null;
  arms: ArmInput[];
  safetyRule: boolean;
  counts: CountsValue[];
  amendment: number;
  maxPerArm: number | null;
}) {
  const router = useRouter();
  const [state, action, pending] = useActionState(async (_p: FormState, fd: FormData): Promise<FormState> => {
    const body = {
      rowVersion: fd.get("rowVersion"),
      cutoffDate: fd.get("cutoffDate"),
      reason: String(fd.get("reason") ?? "") || undefined,
      counts: arms.map((a, i) => ({
        armId: a.id,
        enrolled: fd.get(`counts.${i}.enrolled`),
        treated: safetyRule ? fd.get(`counts.${i}.treated`) : null,
        evaluable: fd.get(`counts.${i}.evaluable`),
        pending: fd.get(`counts.${i}.pending`),
        responders: fd.get(`counts.${i}.responders`),
        toxicities: safetyRule ? fd.get(`counts.${i}.toxicities`) : null,
      })),
    };
    const r = await callApi<{ enrolledTotal: number }>(`${base(trialId, analysisId)}/counts`, jsonInit("PUT", body));
    if (!r.ok) return { failure: r };
    router.refresh();
    return { ok: `Counts saved (${r.data.enrolledTotal} enrolled in total).` };
  }, initial);
  const fe = state.failure?.fieldErrors ?? {};
  const value = (armId: number, k: keyof CountsValue) => {
    const c = counts.find((x) => x.armId === armId);
    const v = c?.[k];
    return v === null || v === undefined ? "" : String(v);
  };
  const cols: Array<[keyof CountsValue, string]> = [
    ["enrolled", "Enrolled"],
    ["evaluable", "Evaluable for response"],
    ["responders", "Responders"],
    ["pending", "Pending (response not yet known)"],
  ];
  if (safetyRule) cols.push(["treated", "Treated (evaluable for toxicity)"], ["toxicities", "With toxicity"]);
  return (
    <form onSubmit={keepValues(action)} className="flex flex-col gap-4" aria-label="Enter counts by hand" noValidate>
      <FocusFirstInvalid after={state} />
      <Outcome state={state} />
      <input type="hidden" name="rowVersion" value={rowVersion} />
      <div className="max-w-xs">
        <Field label="Data cut-off date" name="cutoffDate" error={fe.cutoffDate}>
          <TextInput id="cutoffDate" name="cutoffDate" type="date" defaultValue={cutoffDate ?? ""} required invalid={!!fe.cutoffDate} />
        </Field>
      </div>
      <table className="cairn-table" aria-label="Counts per arm">
        <thead>
          <tr>
            <th scope="col">Arm</th>
            {cols.map(([, label]) => (
              <th scope="col" key={label}>{label}</th>
            ))}
          </tr>
        </thead>
        <tbody>
          {arms.map((a, i) => (
            <tr key={a.id}>
              <th scope="row" className="text-left font-medium">{a.label}</th>
              {cols.map(([k, label]) => {
                const name = `counts.${i}.${k}`;
                return (
                  <td key={k}>
                    <TextInput
                      id={name}
                      name={name}
                      aria-label={`${a.label}: ${label.toLowerCase()}`}
                      inputMode="numeric"
                      defaultValue={value(a.id, k)}
                      className="w-24"
                      invalid={!!fe[name]}
                    />
                    <p id={`${name}-error`} aria-live="polite" className="mt-1 max-w-40 text-xs text-berry-700">{fe[name] ?? ""}</p>
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
      {fe.counts ? <p className="text-xs text-berry-700">{fe.counts}</p> : null}
      <p className="text-xs text-stone-500">
        Cumulative whole numbers at the cut-off, with responders ≤ evaluable for response ≤ enrolled; pending: enrolled patients who will be evaluable but whose response is not yet known (evaluable + pending ≤ enrolled; empty means 0){maxPerArm !== null ? ` ≤ ${maxPerArm} (the design's maximum per arm)` : ""}
        {safetyRule ? "; with toxicity ≤ treated ≤ enrolled (the safety rule counts toxicities among the treated patients)" : ""}. No count may fall below the previous locked look&apos;s.
      </p>
      {amendment > 0 ? (
        <Field label="Reason for this change (amendment)" name="reason" error={fe.reason} hint={`Recorded in the audit trail with the old and new counts. ${CLOSED_FIELD_NOTE}`}>
          <TextArea id="reason" name="reason" rows={2} maxLength={1000} invalid={!!fe.reason} />
        </Field>
      ) : null}
      <div>
        <Button type="submit" disabled={pending}>{pending ? "Saving…" : "Save counts"}</Button>
      </div>
    </form>
  );
}

export function LockForm({ trialId, analysisId, rowVersion, lookNumber, signerName }: { trialId: number; analysisId: number; rowVersion: number; lookNumber: number; signerName: string }) {
  const router = useRouter();
  const [state, action, pending] = useActionState(async (_p: FormState, fd: FormData): Promise<FormState> => {
    const r = await callApi(`${base(trialId, analysisId)}/lock`, jsonInit("POST", { rowVersion: fd.get("rowVersion"), password: fd.get("password") }));
    if (!r.ok) return { failure: r };
    router.refresh();
    return { ok: `Look ${lookNumber} is locked and signed.` };
  }, initial);
  const fe = state.failure?.fieldErrors ?? {};
  return (
    <form noValidate onSubmit={keepValues(action)} className="flex flex-col gap-3" aria-label="Lock this look">
      <FocusFirstInvalid after={state} />
      <Outcome state={state} />
      <input type="hidden" name="rowVersion" value={rowVersion} />
      <p className="text-sm text-stone-700">
        Signing as <strong>{signerName}</strong>, meaning <strong>analysis locked</strong>: the cut-off and counts shown above become the record of look {lookNumber} and can no longer change.
      </p>
      <Field label={`Your password (to sign): analysis locked, look ${lookNumber}`} name="password" error={fe.password}>
        <TextInput id="password" name="password" type="password" autoComplete="current-password" required invalid={!!fe.password} />
      </Field>
      <div>
        <Button type="submit" disabled={pending}>{pending ? "Signing…" : "Sign and lock"}</Button>
      </div>
    </form>
  );
}

export function ReopenForm({ trialId, analysisId, rowVersion, lookNumber }: { trialId: number; analysisId: number; rowVersion: number; lookNumber: number }) {
  const router = useRouter();
  const [state, action, pending] = useActionState(async (_p: FormState, fd: FormData): Promise<FormState> => {
    const r = await callApi<{ amendment: number }>(`${base(trialId, analysisId)}/reopen`, jsonInit("POST", { rowVersion: fd.get("rowVersion"), reason: fd.get("reason") }));
    if (!r.ok) return { failure: r };
    router.refresh();
    return { ok: `Look ${lookNumber} is open again as amendment ${r.data.amendment}.` };
  }, initial);
  const fe = state.failure?.fieldErrors ?? {};
  return (
    <form noValidate onSubmit={keepValues(action)} className="flex flex-col gap-3" aria-label="Correct this look">
      <FocusFirstInvalid after={state} />
      <Outcome state={state} />
      <input type="hidden" name="rowVersion" value={rowVersion} />
      <Field label="Reason for the correction" name="reason" error={fe.reason} hint={`Reopening records an amendment; the old values stay in the audit trail. ${CLOSED_FIELD_NOTE}`}>
        <TextArea id="reason" name="reason" rows={2} maxLength={1000} invalid={!!fe.reason} />
      </Field>
      <div>
        <Button type="submit" variant="secondary" disabled={pending}>{pending ? "Reopening…" : "Reopen as amendment"}</Button>
      </div>
    </form>
  );
}

/**
 * Shown instead of the counts form on a patient-level look: its counts come from its patient rows.
 * Switching removes the rows (with a reason, kept in the audit trail) so the counts can be typed.
 */
export function SwitchToCountLevelForm({ trialId, analysisId, rowVersion, patientRows }: { trialId: number; analysisId: number; rowVersion: number; patientRows: number }) {
  const router = useRouter();
  const [state, action, pending] = useActionState(async (_p: FormState, fd: FormData): Promise<FormState> => {
    const r = await callApi<{ removedPatientRows: number }>(`${base(trialId, analysisId)}/count-level`, jsonInit("POST", { rowVersion: fd.get("rowVersion"), reason: fd.get("reason") }));
    if (!r.ok) return { failure: r };
    router.refresh();
    return { ok: `${r.data.removedPatientRows} patient rows removed; the counts can now be entered by hand.` };
  }, initial);
  const fe = state.failure?.fieldErrors ?? {};
  return (
    <form noValidate onSubmit={keepValues(action)} className="flex flex-col gap-3" aria-label="Switch to count-level entry">
      <FocusFirstInvalid after={state} />
      <Outcome state={state} />
      <p className="text-sm text-stone-700">
        This look is <strong>patient-level</strong>: its counts are derived from its {patientRows} uploaded patient rows and cannot be typed in. To correct them, upload a corrected file. To
        enter counts by hand instead, switch the look to count-level entry: the patient rows are removed, the counts stay as they are until you change them, and the switch is recorded
        with your reason in the audit trail.
      </p>
      <input type="hidden" name="rowVersion" value={rowVersion} />
      <Field label="Reason for switching to count-level entry" name="reason" id="switch-reason" error={fe.reason} hint={CLOSED_FIELD_NOTE}>
        <TextArea id="switch-reason" name="reason" rows={2} maxLength={1000} invalid={!!fe.reason} />
      </Field>
      <div>
        <Button type="submit" variant="secondary" disabled={pending}>{pending ? "Switching…" : "Remove patient rows and switch"}</Button>
      </div>
    </form>
  );
}
