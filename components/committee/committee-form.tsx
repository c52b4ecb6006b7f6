"use client";
/**
 * One form for the committee's acts, described as data by the server page: hidden fields, inputs
 * (select, text area, radio, checkboxes, the signing password), the outcome, and each field's error
 * beside it in an aria-live region. Submitted by hand so a refused submission keeps what was typed.
 */
import { startTransition, useActionState } from "react";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { Field, SelectInput, TextArea, TextInput } from "@/components/ui/field";
import type { CommitteeFormState } from "@/lib/committee/schemas";

type Option = { value: string | number; label: string; checked?: boolean };
type FieldSpec =
  | { kind: "select"; name: string; label: string; options: Option[]; hint?: string; placeholder?: string }
  | { kind: "textarea"; name: string; label: string; hint?: string; rows?: number; defaultValue?: string }
  | { kind: "password"; name: string; label: string }
  | { kind: "radio"; name: string; label: string; options: Option[] }
  | { kind: "checkboxes"; name: string; label: string; options: Option[] };

type Action = (prev: CommitteeFormState, form: FormData) => Promise<CommitteeFormState>;

export function CommitteeForm({ action, label, hidden, fields, submit, pendingLabel, variant = "primary" }: { action: Action; label: string; hidden: Record<string, string | number>; fields: FieldSpec[]; submit: string; pendingLabel: string; variant?: "primary" | "secondary" }) {
  const [state, formAction, pending] = useActionState(action, {});
  const fe = state.fieldErrors ?? {};
  return (
    <form
      action={formAction}
      onSubmit={(e) => {
        e.preventDefault();
        const data = new FormData(e.currentTarget);
        startTransition(() => formAction(data));
      }}
      className="flex flex-col gap-3"
      aria-label={label}
    >
      {Object.entries(hidden).map(([k, v]) => <input key={k} type="hidden" name={k} value={v} />)}
      {fields.map((f) => {
        const id = `${label.replace(/\W+/g, "-")}-${f.name}`;
        if (f.kind === "select")
          return (
            <Field key={f.name} label={f.label} name={id} error={fe[f.name]} hint={f.hint}>
              <SelectInput id={id} name={f.name} defaultValue="" invalid={!!fe[f.name]} aria-describedby={`${id}-error`}>
                <option value="">{f.placeholder ?? "Choose"}</option>
                {f.options.map((o) => <option key={o.value} value={o.value}>{o.label}</option>)}
              </SelectInput>
            </Field>
          );
        if (f.kind === "textarea")
          return (
            <Field key={f.name} label={f.label} name={id} error={fe[f.name]} hint={f.hint}>
              <TextArea id={id} name={f.name} rows={f.rows ?? 4} defaultValue={f.defaultValue} invalid={!!fe[f.name]} aria-describedby={`${id}-error`} />
            </Field>
          );
        if (f.kind === "password")
          return (
            <Field key={f.name} label={f.label} name={id} error={fe[f.name]}>
              <TextInput id={id} name={f.name} type="password" autoComplete="current-password" invalid={!!fe[f.name]} aria-describedby={`${id}-error`} />
            </Field>
          );
        return (
          <fieldset key={f.name} className="flex flex-col gap-1" aria-describedby={`${id}-error`}>
            <legend className="text-sm font-medium text-stone-700">{f.label}</legend>
            {f.options.map((o) => (
              <label key={o.value} className="flex items-center gap-2 text-sm">
                <input type={f.kind === "radio" ? "radio" : "checkbox"} name={f.name} value={o.value} defaultChecked={o.checked} /> {o.label}
              </label>
            ))}
            <p id={`${id}-error`} aria-live="polite" className="text-xs text-berry-700">{fe[f.name]?.[0] ?? ""}</p>
          </fieldset>
        );
      })}
      {state.ok ? <Banner tone="success">{state.ok}</Banner> : null}
      {state.error ? <Banner tone="danger">{state.error}</Banner> : null}
      <Button type="submit" variant={variant} disabled={pending}>{pending ? pendingLabel : submit}</Button>
    </form>
  );
}
