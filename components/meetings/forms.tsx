"use client";
import { useBrowserTimeZone } from "@/components/ui/use-browser-time-zone";
import { startTransition, useActionState, useEffect, useState } from "react";
import { useRouter } from "next/navigation";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { FormErrorSummary } from "@/components/ui/form-error-summary";
import { Field, SelectInput, TextArea, TextInput } from "@/components/ui/field";
import type { MeetingFormState } from "@/lib/meetings/schemas";
import { FocusFirstInvalid } from "@/components/ui/focus-first-invalid";

type Action = (prev: MeetingFormState, form: FormData) => Promise<MeetingFormState>;
const initial: MeetingFormState = {};

function Outcome({ state }: { state: MeetingFormState }) {
  if (state.ok) return <Banner tone="success">{state.ok}</Banner>;
  if (state.error) return <FormErrorSummary error={state.error} fieldErrors={state.fieldErrors} />;
  return null;
}

type MemberChoice = { userId: number; label: string; invitedByDefault: boolean };
type AnalysisChoice = { id: number; label: string };

export function ScheduleMeetingForm({ action, trialId, analyses, members, zones, defaultAnalysisId }: { action: Action; trialId: number; analyses: AnalysisChoice[]; members: MemberChoice[]; zones: string[]; defaultAnalysisId: number | null }) {
  const [state, formAction, pending] = useActionState(action, initial);
  const router = useRouter();
  // Defaults to the organiser's own zone when the runtime offers it; a choice made in the form wins.
  const browserZone = useBrowserTimeZone();
  const [chosenZone, setZone] = useState<string | null>(null);
  const zone = chosenZone ?? (browserZone && zones.includes(browserZone) ? browserZone : "UTC");
  useEffect(() => {
    if (state.meetingId) router.push(`/trials/${trialId}/meetings/${state.meetingId}`);
  }, [state.meetingId, trialId, router]);
  const fe = state.fieldErrors ?? {};
  return (
    <form noValidate
      action={formAction}
      // Submitted by hand so React does not reset the fields after a refused submission: the
      // organiser keeps what they typed and sees the messages next to it.
      onSubmit={(e) => {
        e.preventDefault();
        const data = new FormData(e.currentTarget);
        startTransition(() => formAction(data));
      }}
      className="flex flex-col gap-3"
      aria-label="Schedule a DMC meeting"
    >
      <FocusFirstInvalid after={state} />
      <Outcome state={state} />
      <input type="hidden" name="trialId" value={trialId} />
      <Field label="Analysis reviewed" name="analysisId" error={fe.analysisId}>
        <SelectInput id="analysisId" name="analysisId" defaultValue={defaultAnalysisId ?? ""} invalid={!!fe.analysisId}>
          <option value="" disabled>Choose a look</option>
          {analyses.map((a) => <option key={a.id} value={a.id}>{a.label}</option>)}
        </SelectInput>
      </Field>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Date and time" name="scheduledLocal" error={fe.scheduledLocal} hint="Wall-clock time in the chosen time zone.">
          <TextInput id="scheduledLocal" name="scheduledLocal" type="datetime-local" invalid={!!fe.scheduledLocal} required />
        </Field>
        <Field label="Time zone" name="timeZone" error={fe.timeZone}>
          <SelectInput id="timeZone" name="timeZone" value={zone} onChange={(e) => setZone(e.target.value)} invalid={!!fe.timeZone}>
            {zones.map((z) => <option key={z} value={z}>{z}</option>)}
          </SelectInput>
        </Field>
      </div>
      <fieldset className="flex flex-col gap-1" aria-describedby="attendeeIds-error">
        <legend className="text-sm font-medium text-stone-700">Attendees (members of this trial)</legend>
        {members.length === 0 ? <p className="text-sm text-stone-600">Nobody holds a role on this trial yet.</p> : null}
        {members.map((m) => (
          <label key={m.userId} className="flex items-center gap-2 text-sm">
            <input type="checkbox" name="attendeeIds" value={m.userId} defaultChecked={m.invitedByDefault} /> {m.label}
          </label>
        ))}
        <p id="attendeeIds-error" aria-live="polite" className="text-xs text-berry-700">{fe.attendeeIds?.[0] ?? ""}</p>
      </fieldset>
      <Field label="Open session agenda" name="openAgenda" error={fe.openAgenda} hint="Open: blinded roles (sponsor, coordinator, administrator) will read this, in the open report, reminders and the audit trail.">
        <TextArea id="openAgenda" name="openAgenda" rows={3} maxLength={5000} invalid={!!fe.openAgenda} />
      </Field>
      <Field label="Closed session agenda" name="closedAgenda" error={fe.closedAgenda} hint="Closed: only the DMC and the unblinded statistician read this (closed report, closed audit entry). Once saved, you cannot read it back here unless you are unblinded.">
        <TextArea id="closedAgenda" name="closedAgenda" rows={3} maxLength={5000} invalid={!!fe.closedAgenda} />
      </Field>
      <Field label="Reminder (days before)" name="reminderDaysBefore" error={fe.reminderDaysBefore}>
        <TextInput id="reminderDaysBefore" name="reminderDaysBefore" type="number" min={0} max={60} defaultValue={3} invalid={!!fe.reminderDaysBefore} />
      </Field>
      <Button type="submit" disabled={pending}>{pending ? "Scheduling…" : "Schedule meeting"}</Button>
    </form>
  );
}

/** A one-button form posting hidden fields to an action, with its outcome shown beside it. */
export function ActionButton({ action, fields, label, pendingLabel, variant = "primary", confirm }: { action: Action; fields: Record<string, string | number>; label: string; pendingLabel: string; variant?: "primary" | "secondary" | "danger" | "quiet"; confirm?: string }) {
  const [state, formAction, pending] = useActionState(action, initial);
  return (
    <form noValidate
      action={formAction}
      className="flex flex-col gap-2"
      onSubmit={(e) => {
        if (confirm && !window.confirm(confirm)) e.preventDefault();
      }}
    >
      {Object.entries(fields).map(([k, v]) => <input key={k} type="hidden" name={k} value={v} />)}
      <Button type="submit" variant={variant} disabled={pending}>{pending ? pendingLabel : label}</Button>
      <Outcome state={state} />
    </form>
  );
}

export function AttendanceForm({ action, trialId, meetingId, rowVersion, attendees }: { action: Action; trialId: number; meetingId: number; rowVersion: number; attendees: { userId: number; label: string; attended: boolean | null }[] }) {
  const [state, formAction, pending] = useActionState(action, initial);
  return (
    <form noValidate action={formAction} className="flex flex-col gap-2" aria-label="Record attendance">
      <FocusFirstInvalid after={state} />
      <input type="hidden" name="trialId" value={trialId} />
      <input type="hidden" name="meetingId" value={meetingId} />
      <input type="hidden" name="rowVersion" value={rowVersion} />
      {attendees.map((a) => (
        <label key={a.userId} className="flex items-center gap-2 text-sm">
          <input type="checkbox" name="attendedIds" value={a.userId} defaultChecked={a.attended === true} /> {a.label}
        </label>
      ))}
      <Button type="submit" variant="secondary" disabled={pending}>{pending ? "Saving…" : "Record attendance"}</Button>
      <Outcome state={state} />
    </form>
  );
}

/** While messages are still on their way, refreshes the server-rendered status every few seconds. */
export function DeliveryAutoRefresh({ active }: { active: boolean }) {
  const router = useRouter();
  useEffect(() => {
    if (!active) return;
    const t = setInterval(() => router.refresh(), 2500);
    return () => clearInterval(t);
  }, [active, router]);
  return active ? <p className="text-xs text-stone-500" role="status">Sending in the background; this list updates by itself.</p> : null;
}
