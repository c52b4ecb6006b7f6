"use client";
import { useActionState, useState } from "react";
import { createTrialAction } from "./actions";
import type { NewTrialFormState } from "@/lib/design/trial-schema";
import { Button } from "@/components/ui/button";
import { FormErrorSummary } from "@/components/ui/form-error-summary";
import { Field, SelectInput, TextInput } from "@/components/ui/field";
import { FocusFirstInvalid } from "@/components/ui/focus-first-invalid";

const initial: NewTrialFormState = {};

export function NewTrialForm() {
  const [state, action, pending] = useActionState(createTrialAction, initial);
  const fe = state.fieldErrors ?? {};
  const v = state.values ?? {};
  const [designType, setDesignType] = useState<"single" | "two">((v.designType as "single" | "two") ?? "single");
  return (
    <form action={action} className="flex flex-col gap-4" aria-label="New trial" noValidate>
      <FocusFirstInvalid after={state} />
      <FormErrorSummary error={state.error} fieldErrors={state.fieldErrors} />
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Trial code" name="code" error={fe.code} hint="Short and unique, e.g. CRN-410.">
          <TextInput id="code" name="code" defaultValue={v.code} maxLength={40} invalid={!!fe.code} />
        </Field>
        <Field label="Phase" name="phase" error={fe.phase}>
          <SelectInput id="phase" name="phase" defaultValue={v.phase ?? "II"} invalid={!!fe.phase}>
            {["I", "I/II", "II", "II/III", "III"].map((p) => (
              <option key={p} value={p}>{p}</option>
            ))}
          </SelectInput>
        </Field>
      </div>
      <Field label="Title" name="title" error={fe.title}>
        <TextInput id="title" name="title" defaultValue={v.title} maxLength={300} invalid={!!fe.title} />
      </Field>
      <Field label="Sponsor" name="sponsorName" error={fe.sponsorName}>
        <TextInput id="sponsorName" name="sponsorName" defaultValue={v.sponsorName} maxLength={200} invalid={!!fe.sponsorName} />
      </Field>
      <fieldset className="flex flex-col gap-2">
        <legend className="text-sm font-medium text-stone-700">Arms</legend>
        <div className="flex gap-4 text-sm">
          <label className="flex items-center gap-2">
            <input type="radio" name="designType" value="single" checked={designType === "single"} onChange={() => setDesignType("single")} /> Single arm
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" name="designType" value="two" checked={designType === "two"} onChange={() => setDesignType("two")} /> Two arms (experimental and control)
          </label>
        </div>
        <p aria-live="polite" className="text-xs text-berry-700">{fe.designType?.[0] ?? ""}</p>
      </fieldset>
      {designType === "single" ? (
        <Field label="Arm label" name="armLabel" error={fe.armLabel}>
          <TextInput id="armLabel" name="armLabel" defaultValue={v.armLabel} maxLength={100} invalid={!!fe.armLabel} />
        </Field>
      ) : (
        <div className="grid gap-4 sm:grid-cols-2">
          <Field label="Experimental arm label" name="experimentalArmLabel" error={fe.experimentalArmLabel}>
            <TextInput id="experimentalArmLabel" name="experimentalArmLabel" defaultValue={v.experimentalArmLabel} maxLength={100} invalid={!!fe.experimentalArmLabel} />
          </Field>
          <Field label="Control arm label" name="controlArmLabel" error={fe.controlArmLabel}>
            <TextInput id="controlArmLabel" name="controlArmLabel" defaultValue={v.controlArmLabel} maxLength={100} invalid={!!fe.controlArmLabel} />
          </Field>
        </div>
      )}
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Endpoint" name="endpointName" error={fe.endpointName} hint="The binary efficacy endpoint, e.g. objective response at week 12.">
          <TextInput id="endpointName" name="endpointName" defaultValue={v.endpointName} maxLength={200} invalid={!!fe.endpointName} />
        </Field>
        <Field label="Toxicity endpoint (optional)" name="toxicityEndpointName" error={fe.toxicityEndpointName} hint="Needed only for a safety rule.">
          <TextInput id="toxicityEndpointName" name="toxicityEndpointName" defaultValue={v.toxicityEndpointName} maxLength={200} invalid={!!fe.toxicityEndpointName} />
        </Field>
      </div>
      <Field label="Target enrolment" name="targetEnrolment" error={fe.targetEnrolment} hint="All arms together.">
        <TextInput id="targetEnrolment" name="targetEnrolment" inputMode="numeric" defaultValue={v.targetEnrolment} invalid={!!fe.targetEnrolment} />
      </Field>
      <div>
        <Button type="submit" disabled={pending}>{pending ? "Creating…" : "Create trial"}</Button>
      </div>
    </form>
  );
}
