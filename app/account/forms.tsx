"use client";
import { useActionState } from "react";
import { changePassword, createApiTokenAction, revokeApiTokenAction } from "./actions";
import type { ApiTokenFormState, PasswordFormState, RevokeFormState } from "./schemas";
import { Button } from "@/components/ui/button";
import { Field, SelectInput, TextInput } from "@/components/ui/field";
import { Banner } from "@/components/ui/banner";
import { FormErrorSummary } from "@/components/ui/form-error-summary";
import { NewPasswordFields, PasswordSetNotice } from "@/components/account/password-fields";
import { FocusFirstInvalid } from "@/components/ui/focus-first-invalid";

export function ChangePasswordForm() {
  const [state, action, pending] = useActionState(changePassword, {} as PasswordFormState);
  const fe = state.fieldErrors ?? {};
  if (state.ok) return <PasswordSetNotice message={state.ok} />;
  return (
    <form action={action} noValidate className="flex flex-col gap-3" aria-label="Change your password">
      <FocusFirstInvalid after={state} />
      <FormErrorSummary error={state.error} fieldErrors={state.fieldErrors} />
      <Field label="Current password" name="currentPassword" error={fe.currentPassword}>
        <TextInput id="currentPassword" name="currentPassword" type="password" autoComplete="current-password" maxLength={200} invalid={!!fe.currentPassword} />
      </Field>
      <NewPasswordFields errors={fe} hint="At least 12 characters. It is also the password you type to sign records." />
      <Button type="submit" disabled={pending}>{pending ? "Changing…" : "Change password"}</Button>
    </form>
  );
}

type TokenScope = { value: string; label: string };

/** Makes a personal API token; shows its secret once. */
export function CreateApiTokenForm({ scopes, maxDays }: { scopes: TokenScope[]; maxDays: number }) {
  const [state, action, pending] = useActionState(createApiTokenAction, {} as ApiTokenFormState);
  const fe = state.fieldErrors ?? {};
  if (scopes.length === 0) return <p className="text-sm text-stone-600">You hold no role on any trial, so there is nothing a token could do.</p>;
  return (
    <div className="flex flex-col gap-3">
      {state.token ? (
        <Banner tone="success" title="Copy your new token now">
          <p>{state.ok}</p>
          <p className="mt-2 break-all font-mono text-sm" data-testid="new-api-token">{state.token}</p>
          <p className="mt-1 text-xs">For {state.trialCode}; expires {state.expiresAt?.slice(0, 10)}. Send it as <code>Authorization: Bearer &lt;token&gt;</code>.</p>
        </Banner>
      ) : null}
      <form action={action} noValidate className="flex flex-col gap-3" aria-label="Make an API token">
        {state.error ? <Banner tone="danger">{state.error}</Banner> : null}
        <Field label="Trial and role" name="scope" error={fe.scope} hint="The token can do what this role may do on this trial, and nothing else.">
          <SelectInput id="scope" name="scope" invalid={!!fe.scope} defaultValue={scopes[0].value}>
            {scopes.map((s) => (
              <option key={s.value} value={s.value}>
                {s.label}
              </option>
            ))}
          </SelectInput>
        </Field>
        <Field label="Name" name="label" error={fe.label} hint="For example the export job that uses it. Open: it appears in the trial's audit trail, which blinded roles read; never type results here.">
          <TextInput id="label" name="label" maxLength={80} invalid={!!fe.label} />
        </Field>
        <Field label="Days until it expires" name="days" error={fe.days} hint={`1 to ${maxDays}.`}>
          <TextInput id="days" name="days" type="number" min={1} max={maxDays} defaultValue={30} invalid={!!fe.days} />
        </Field>
        <Button type="submit" disabled={pending}>{pending ? "Making…" : "Make token"}</Button>
      </form>
    </div>
  );
}

/** Revokes one token. */
export function RevokeApiTokenButton({ tokenId, label }: { tokenId: number; label: string }) {
  const [state, action, pending] = useActionState(revokeApiTokenAction, {} as RevokeFormState);
  return (
    <form action={action} className="inline-flex items-center gap-2">
      <input type="hidden" name="tokenId" value={tokenId} />
      <Button type="submit" variant="secondary" disabled={pending} aria-label={`Revoke the token ${label}`}>{pending ? "Revoking…" : "Revoke"}</Button>
      {state.error ? <span className="text-xs text-berry-700" role="alert">{state.error}</span> : null}
    </form>
  );
}
