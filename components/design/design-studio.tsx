"use client";
/**
 * The design studio: the versions of a trial's design, the form of the one being viewed (editable
 * when it is a draft and the viewer may edit), the live boundaries and operating characteristics,
 * calibration, save (with a revision check), lock with an e-signature, and amendments.
 */
import { callApi, jsonInit, type ApiFailure } from "@/lib/api-client";
import { useMemo, useRef, useState } from "react";
import { useRouter } from "next/navigation";
import { format } from "date-fns";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { Badge } from "@/components/ui/badge";
import { Card } from "@/components/ui/card";
import { Field, TextArea, TextInput } from "@/components/ui/field";
import { firstInvalidControl } from "@/components/ui/focus-first-invalid";
import { DesignFormFields } from "./design-form";
import { PreviewPanel, usePreview } from "./preview-panel";
import { CalibrationPanel } from "./calibration-panel";
import { SEARCH_WORDS, thresholdWord } from "@/lib/design/threshold-labels";
import { defaultDesign, designToForm, formToCandidate, issuesToFieldErrors, validateDesignCandidate, type DesignForm, type FieldErrors } from "@/lib/design/form-model";
import type { DesignVersionJson } from "@/lib/design/serialize";
import type { CalibratedDesign } from "@/lib/stats/calibration";
import { OPEN_FIELD_NOTE } from "@/lib/field-visibility";

type Props = {
  trialId: number;
  designType: "single" | "two";
  armLabels: { single?: string; experimental?: string; control?: string };
  versions: DesignVersionJson[];
  canEdit: boolean;
  canLock: boolean;
};

type Outcome = { tone: "success" | "danger" | "warning"; text: string } | null;

const STATUS_BADGE = {
  draft: <Badge tone="amber">Draft</Badge>,
  locked: <Badge tone="teal">Charter version (locked)</Badge>,
  superseded: <Badge>Superseded</Badge>,
} as const;

function when(iso: string) {
  return <time dateTime={iso} suppressHydrationWarning>{format(new Date(iso), "d MMM yyyy, HH:mm")}</time>;
}

type DesignAnswer = { design: DesignVersionJson };

export function DesignStudio({ trialId, designType, armLabels, versions: initialVersions, canEdit, canLock }: Props) {
  const router = useRouter();
  const [versions, setVersions] = useState(initialVersions);
  const initialSelected = initialVersions.find((v) => v.status === "draft") ?? initialVersions.find((v) => v.status === "locked") ?? initialVersions[0];
  const [selectedId, setSelectedId] = useState<number | "new">(initialSelected?.id ?? "new");
  const selected = selectedId === "new" ? null : versions.find((v) => v.id === selectedId) ?? null;
  const [form, setForm] = useState<DesignForm>(() => designToForm(initialSelected?.spec ?? defaultDesign(designType)));
  const [savedForm, setSavedForm] = useState<string>(() => JSON.stringify(form));
  const [serverErrors, setServerErrors] = useState<FieldErrors>({});
  const [outcome, setOutcome] = useState<Outcome>(null);
  const [busy, setBusy] = useState(false);
  const formBox = useRef<HTMLDivElement>(null);
  const [password, setPassword] = useState("");
  const [passwordError, setPasswordError] = useState<string | undefined>();
  const [reason, setReason] = useState("");
  const [reasonError, setReasonError] = useState<string | undefined>();

  const editable = canEdit && (selectedId === "new" || selected?.status === "draft");
  const draftExists = versions.some((v) => v.status === "draft");
  const dirty = JSON.stringify(form) !== savedForm;
  const validation = useMemo(() => validateDesignCandidate(formToCandidate(form)), [form]);
  const errors: FieldErrors = { ...(validation.ok ? {} : validation.errors), ...serverErrors };
  const design = validation.ok ? validation.design : null;
  const preview = usePreview(trialId, design);

  function show(v: DesignVersionJson | null) {
    const f = designToForm(v?.spec ?? defaultDesign(designType));
    setSelectedId(v?.id ?? "new");
    setForm(f);
    setSavedForm(JSON.stringify(f));
    setServerErrors({});
    setPassword("");
    setPasswordError(undefined);
  }

  function change(f: DesignForm) {
    setForm(f);
    setServerErrors({});
  }

  function upsert(v: DesignVersionJson, others?: (list: DesignVersionJson[]) => DesignVersionJson[]) {
    setVersions((list) => {
      const rest = (others ? others(list) : list).filter((x) => x.id !== v.id);
      return [v, ...rest].sort((a, b) => b.version - a.version);
    });
  }

  function failure(f: ApiFailure) {
    if (f.pathIssues.length) {
      setServerErrors(issuesToFieldErrors(f.pathIssues.map((i) => ({ ...i, path: i.path.replace(/^spec\.?/, "") }))));
      focusFirstInvalid();
    }
    setOutcome({ tone: "danger", text: f.error });
  }

  /** After the errors are drawn, focus moves to the first field to fix (WCAG 3.3.1). */
  function focusFirstInvalid() {
    requestAnimationFrame(() => {
      if (formBox.current) firstInvalidControl(formBox.current)?.focus();
    });
  }

  async function save() {
    if (!validation.ok) {
      setOutcome({ tone: "danger", text: "Check the highlighted fields; nothing was saved." });
      focusFirstInvalid();
      return;
    }
    setBusy(true);
    setOutcome(null);
    try {
      const r =
        selectedId === "new"
          ? await callApi<DesignAnswer>(`/api/trials/${trialId}/designs`, jsonInit("POST", { spec: validation.design }))
          : await callApi<DesignAnswer>(`/api/trials/${trialId}/designs/${selectedId}`, jsonInit("PUT", { spec: validation.design, rowVersion: selected?.rowVersion }));
      if (!r.ok) return failure(r);
      const saved = r.data.design;
      upsert(saved);
      setSelectedId(saved.id);
      setSavedForm(JSON.stringify(form));
      setOutcome({ tone: "success", text: `Draft version ${saved.version} saved (revision ${saved.rowVersion}).` });
    } finally {
      setBusy(false);
    }
  }

  async function lock() {
    if (!selected) return;
    if (!password) {
      setPasswordError("Enter your password to sign.");
      return;
    }
    setBusy(true);
    setOutcome(null);
    setPasswordError(undefined);
    try {
      const r = await callApi<DesignAnswer>(`/api/trials/${trialId}/designs/${selected.id}/lock`, jsonInit("POST", { password, rowVersion: selected.rowVersion }));
      setPassword("");
      if (!r.ok) {
        if (r.status === 422 && /password/i.test(r.error)) {
          setPasswordError(r.error);
          return;
        }
        return failure(r);
      }
      const locked = r.data.design;
      upsert(locked, (list) => list.map((v) => (v.status === "locked" ? { ...v, status: "superseded" as const } : v)));
      setOutcome({ tone: "success", text: `Version ${locked.version} is locked as the charter version. The planned analyses follow its looks.` });
      router.refresh();
    } finally {
      setBusy(false);
    }
  }

  async function amend() {
    if (!selected) return;
    if (reason.trim().length < 5) {
      setReasonError("Give the reason for the amendment (at least 5 characters).");
      return;
    }
    setBusy(true);
    setOutcome(null);
    setReasonError(undefined);
    try {
      const r = await callApi<DesignAnswer>(`/api/trials/${trialId}/designs/${selected.id}/amend`, jsonInit("POST", { reason }));
      if (!r.ok) {
        if (r.pathIssues.length) setReasonError(r.pathIssues[0].message);
        return failure(r);
      }
      const draft = r.data.design;
      upsert(draft);
      show(draft);
      setReason("");
      setOutcome({ tone: "success", text: `Amendment started: draft version ${draft.version}, copied from version ${selected.version}.` });
    } finally {
      setBusy(false);
    }
  }

  function applyCalibrated(d: CalibratedDesign) {
    change({ ...form, thetaT: String(d.thetaT), futilityThreshold: String(d.thetaL), ...(d.thetaU !== null ? { efficacyThreshold: String(d.thetaU), efficacyStopping: true } : {}) });
    const rule = form.ruleKind === "predictive" ? "predictive" : "posterior";
    setOutcome({
      tone: "warning",
      text: `Thresholds copied into the form (${thresholdWord("thetaT").word.toLowerCase()} ${d.thetaT}, ${thresholdWord("futilityThreshold", rule).word.toLowerCase()} ${d.thetaL}${d.thetaU !== null ? `, ${thresholdWord("efficacyThreshold", rule).word.toLowerCase()} ${d.thetaU}` : ""}). Save the draft to keep them.`,
    });
  }

  return (
    <div className="flex flex-col gap-4">
      <Card title="Design versions">
        {versions.length === 0 ? (
          <p className="text-sm text-stone-600">{canEdit ? "No design yet. Fill in the form below and save the first draft." : "No design has been saved yet."}</p>
        ) : (
          <ul className="flex flex-col divide-y divide-stone-100" aria-label="Design versions">
            {versions.map((v) => (
              <li key={v.id} className="flex flex-wrap items-center justify-between gap-2 py-2" data-testid={`design-version-${v.version}`}>
                <div className="flex flex-col gap-0.5 text-sm">
                  <div className="flex items-center gap-2">
                    <span className="font-semibold">Version {v.version}</span>
                    {STATUS_BADGE[v.status]}
                    {v.id === selectedId ? <span className="text-xs text-stone-500">(shown below)</span> : null}
                  </div>
                  {v.amendmentReason ? <p className="text-xs text-stone-700">Amendment: {v.amendmentReason}</p> : null}
                  {v.signature ? (
                    <p className="text-xs text-stone-700" data-testid="design-signature">
                      Signed by {v.signature.signerName} · meaning “{v.signature.meaning}” · {when(v.signature.signedAt)} · record hash <code title={v.signature.recordHash}>{v.signature.recordHash.slice(0, 12)}…</code>
                    </p>
                  ) : (
                    <p className="text-xs text-stone-500">Created {when(v.createdAt)}{v.createdByName ? ` by ${v.createdByName}` : ""} · revision {v.rowVersion}</p>
                  )}
                </div>
                {v.id !== selectedId ? (
                  <Button type="button" variant="secondary" onClick={() => show(v)} aria-label={`Show version ${v.version}`}>
                    Show
                  </Button>
                ) : null}
              </li>
            ))}
          </ul>
        )}
      </Card>

      {outcome ? <Banner tone={outcome.tone}>{outcome.text}</Banner> : null}

      <div className="grid grid-cols-1 gap-4 xl:grid-cols-[minmax(0,5fr)_minmax(0,7fr)]">
        <div className="flex flex-col gap-4">
          <Card title={selected ? `Version ${selected.version}${editable ? " (draft, editable)" : ""}` : "New design"}>
            {!editable ? (
              <p className="mb-3 text-xs text-stone-600">
                {selected?.status === "draft" ? "You may read this draft; editing needs the statistician or administrator role." : "This version is read-only. Earlier versions stay readable; a change to the charter version is made as an amendment."}
              </p>
            ) : null}
            <div ref={formBox}>
              <DesignFormFields form={form} errors={errors} readOnly={!editable} armLabels={armLabels} onChange={change} />
            </div>
            {editable ? (
              <div className="mt-4 flex items-center gap-3">
                <Button type="button" onClick={save} disabled={busy}>
                  {busy ? "Saving…" : "Save draft"}
                </Button>
                <span className="text-xs text-stone-500" aria-live="polite">{dirty ? "Unsaved changes" : selected ? "Saved" : ""}</span>
              </div>
            ) : null}
          </Card>

          {selected?.status === "draft" && canLock ? (
            <Card title="Lock as the charter version">
              <p className="mb-3 text-xs text-stone-600">
                Signing records your name, the meaning “design approved” and the time, bound to version {selected.version} as saved (revision {selected.rowVersion}). A locked design cannot be edited; changes need an amendment with a reason.
              </p>
              {dirty ? <p className="mb-2 text-sm text-amber-700">Save your changes first: only the saved draft can be signed.</p> : null}
              <form noValidate
                className="flex flex-col gap-3"
                onSubmit={(e) => {
                  e.preventDefault();
                  void lock();
                }}
              >
                <Field label={`Your password (to sign): design approved, version ${selected.version}`} name="sign-password" error={passwordError}>
                  <TextInput id="sign-password" name="sign-password" type="password" autoComplete="current-password" value={password} invalid={!!passwordError} onChange={(e) => setPassword(e.target.value)} />
                </Field>
                <div>
                  <Button type="submit" disabled={busy || dirty}>
                    Sign and lock version {selected.version}
                  </Button>
                </div>
              </form>
            </Card>
          ) : null}

          {selected?.status === "locked" && canEdit && !draftExists ? (
            <Card title="Amend the charter version">
              <form noValidate
                className="flex flex-col gap-3"
                onSubmit={(e) => {
                  e.preventDefault();
                  void amend();
                }}
              >
                <Field label="Reason for the amendment" name="amend-reason" error={reasonError} hint={`Recorded with the new version and in the audit trail. ${OPEN_FIELD_NOTE}`}>
                  <TextArea id="amend-reason" name="amend-reason" rows={3} maxLength={2000} value={reason} invalid={!!reasonError} onChange={(e) => setReason(e.target.value)} />
                </Field>
                <div>
                  <Button type="submit" variant="secondary" disabled={busy}>
                    Start amendment
                  </Button>
                </div>
              </form>
            </Card>
          ) : null}

          {editable ? (
            <Card title={SEARCH_WORDS.search}>
              <CalibrationPanel trialId={trialId} design={design} onUse={applyCalibrated} />
            </Card>
          ) : null}
        </div>
        <Card>
          <PreviewPanel preview={preview} invalid={!validation.ok} />
        </Card>
      </div>
    </div>
  );
}
