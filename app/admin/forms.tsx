"use client";
import { useActionState, useState } from "react";
import { assignRole, createAccount, deactivateAccount, reactivateAccount, removeRole, sendPasswordLink } from "./actions";
import type { FormState } from "./schemas";
import { Button } from "@/components/ui/button";
import { Field, SelectInput, TextInput } from "@/components/ui/field";
import { Banner } from "@/components/ui/banner";
import { FormErrorSummary } from "@/components/ui/form-error-summary";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { FocusFirstInvalid } from "@/components/ui/focus-first-invalid";

const initial: FormState = {};

function Outcome({ state }: { state: FormState }) {
  if (state.ok) return <Banner tone="success">{state.ok}</Banner>;
  if (state.error) return <FormErrorSummary error={state.error} fieldErrors={state.fieldErrors} />;
  return null;
}

/** The link is shown once, here, for when the e-mail does not arrive; it is not stored in a readable form. */
function LinkOnce({ state }: { state: FormState }) {
  if (!state.link) return null;
  return (
    <div className="rounded-card border border-stone-300 bg-stone-50 p-3 text-sm" data-testid="password-link">
      <p className="font-medium">Set-password link for {state.link.forName} (shown once, valid until {state.link.expiresAt})</p>
      <p className="mt-1 break-all font-mono text-xs">{state.link.url}</p>
      <p className="mt-1 text-stone-700">It was e-mailed to the person. Pass it on only to them, only if the e-mail does not arrive. Do not open it yourself: the password must be chosen by its owner alone.</p>
    </div>
  );
}

export function CreateAccountForm() {
  const [state, action, pending] = useActionState(createAccount, initial);
  const fe = state.fieldErrors ?? {};
  return (
    <form action={action} noValidate className="flex flex-col gap-3" aria-label="Create an account">
      <FocusFirstInvalid after={state} />
      <Outcome state={state} />
      <LinkOnce state={state} />
      <Field label="Name" name="name" error={fe.name}>
        <TextInput id="name" name="name" maxLength={120} invalid={!!fe.name} defaultValue={state.values?.name} />
      </Field>
      <Field label="E-mail" name="email" error={fe.email} hint="The person receives a one-time link to choose their own password.">
        <TextInput id="email" name="email" type="email" maxLength={254} invalid={!!fe.email} defaultValue={state.values?.email} />
      </Field>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" name="isAdmin" /> Administrator (manages accounts; stays blinded)
      </label>
      <Button type="submit" disabled={pending}>{pending ? "Creating…" : "Create account"}</Button>
    </form>
  );
}

export function AssignRoleForm({ users, trials }: { users: { id: number; label: string }[]; trials: { id: number; label: string }[] }) {
  const [state, action, pending] = useActionState(assignRole, initial);
  const fe = state.fieldErrors ?? {};
  return (
    <form action={action} noValidate className="flex flex-col gap-3" aria-label="Give a role on a trial">
      <FocusFirstInvalid after={state} />
      <Outcome state={state} />
      <Field label="Person" name="userId" error={fe.userId}>
        <SelectInput id="userId" name="userId" defaultValue="" invalid={!!fe.userId}>
          <option value="" disabled>Choose a person</option>
          {users.map((u) => <option key={u.id} value={u.id}>{u.label}</option>)}
        </SelectInput>
      </Field>
      <Field label="Trial" name="trialId" error={fe.trialId}>
        <SelectInput id="trialId" name="trialId" defaultValue="" invalid={!!fe.trialId}>
          <option value="" disabled>Choose a trial</option>
          {trials.map((t) => <option key={t.id} value={t.id}>{t.label}</option>)}
        </SelectInput>
      </Field>
      <Field label="Role" name="role" error={fe.role} hint="Sponsor and coordinator are never combined with an unblinded role on one trial. Another administrator must give you an unblinded role.">
        <SelectInput id="role" name="role" defaultValue="" invalid={!!fe.role}>
          <option value="" disabled>Choose a role</option>
          {Object.entries(ROLE_LABELS).map(([k, v]) => <option key={k} value={k}>{v}</option>)}
        </SelectInput>
      </Field>
      <Button type="submit" disabled={pending}>{pending ? "Saving…" : "Give role"}</Button>
    </form>
  );
}

/**
 * Removing a role asks first: the first click shows what will be removed and a confirm button; only
 * that one posts. The server still refuses what must not happen (the last unblinded statistician).
 */
export function RemoveRoleButton({ membershipId, label }: { membershipId: number; label: string }) {
  const [state, action, pending] = useActionState(removeRole, initial);
  const [asking, setAsking] = useState(false);
  if (!asking) {
    return (
      <div className="flex flex-col gap-1">
        <Button type="button" variant="quiet" aria-label={label} onClick={() => setAsking(true)}>Remove</Button>
        {state.error ? <span role="alert" className="text-xs text-berry-700">{state.error}</span> : null}
      </div>
    );
  }
  return (
    <form noValidate action={action} className="flex flex-col gap-2 rounded-card border border-berry-100 bg-berry-50 p-2" aria-label={`Confirm: ${label}`}>
      <input type="hidden" name="membershipId" value={membershipId} />
      <p className="text-xs text-stone-800">{label}? The person loses access that comes with this role at once.</p>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" variant="danger" disabled={pending}>Yes, remove the role</Button>
        <Button type="button" variant="quiet" onClick={() => setAsking(false)}>Keep it</Button>
      </div>
      {state.error ? <span role="alert" className="text-xs text-berry-700">{state.error}</span> : null}
    </form>
  );
}

/** Per-account actions: a new set-password link, deactivate or reactivate. */
export function AccountActions({ userId, name, isActive, isSelf }: { userId: number; name: string; isActive: boolean; isSelf: boolean }) {
  const [linkState, linkAction, linkPending] = useActionState(sendPasswordLink, initial);
  const [offState, offAction, offPending] = useActionState(deactivateAccount, initial);
  const [onState, onAction, onPending] = useActionState(reactivateAccount, initial);
  const activeState = isActive ? offState : onState;
  const message = activeState.error ?? linkState.error;
  return (
    <div className="flex flex-col gap-1">
      <div className="flex flex-wrap items-center gap-2">
        {isActive ? (
          <form noValidate action={linkAction}>
            <input type="hidden" name="userId" value={userId} />
            <Button type="submit" variant="quiet" aria-label={`New link: send ${name} a new set-password link`} disabled={linkPending}>New link</Button>
          </form>
        ) : null}
        {isSelf ? null : isActive ? (
          <form noValidate action={offAction}>
            <input type="hidden" name="userId" value={userId} />
            <Button type="submit" variant="quiet" aria-label={`Deactivate ${name}`} disabled={offPending}>Deactivate</Button>
          </form>
        ) : (
          <form noValidate action={onAction}>
            <input type="hidden" name="userId" value={userId} />
            <Button type="submit" variant="quiet" aria-label={`Reactivate ${name}`} disabled={onPending}>Reactivate</Button>
          </form>
        )}
      </div>
      {message ? <span role="alert" className="text-xs text-berry-700">{message}</span> : null}
      {offState.ok && !isActive ? <span role="status" className="text-xs text-stone-700">{offState.ok}</span> : null}
      {onState.ok && isActive ? <span role="status" className="text-xs text-stone-700">{onState.ok}</span> : null}
      <LinkOnce state={linkState} />
    </div>
  );
}
