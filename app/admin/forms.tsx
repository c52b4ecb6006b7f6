"use client";
import { useActionState } from "react";
import { assignRole, createAccount, removeRole } from "./actions";
import type { FormState } from "./schemas";
import { Button } from "@/components/ui/button";
import { Field, SelectInput, TextInput } from "@/components/ui/field";
import { Banner } from "@/components/ui/banner";
import { ROLE_LABELS } from "@/lib/auth/permissions";

const initial: FormState = {};

function Outcome({ state }: { state: FormState }) {
  if (state.ok) return <Banner tone="success">{state.ok}</Banner>;
  if (state.error) return <Banner tone="danger">{state.error}</Banner>;
  return null;
}

export function CreateAccountForm() {
  const [state, action, pending] = useActionState(createAccount, initial);
  const fe = state.fieldErrors ?? {};
  return (
    <form action={action} noValidate className="flex flex-col gap-3" aria-label="Create an account">
      <Outcome state={state} />
      <Field label="Name" name="name" error={fe.name}>
        <TextInput id="name" name="name" maxLength={120} invalid={!!fe.name} defaultValue={state.values?.name} />
      </Field>
      <Field label="E-mail" name="email" error={fe.email}>
        <TextInput id="email" name="email" type="email" maxLength={254} invalid={!!fe.email} defaultValue={state.values?.email} />
      </Field>
      <Field label="Initial password" name="password" error={fe.password} hint="At least 12 characters. Share it with the person by a separate channel.">
        <TextInput id="password" name="password" type="password" autoComplete="new-password" maxLength={200} invalid={!!fe.password} />
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
      <Field label="Role" name="role" error={fe.role}>
        <SelectInput id="role" name="role" defaultValue="" invalid={!!fe.role}>
          <option value="" disabled>Choose a role</option>
          {Object.entries(ROLE_LABELS).map(([k, v]) => <option key={k} value={k}>{v}</option>)}
        </SelectInput>
      </Field>
      <Button type="submit" disabled={pending}>{pending ? "Saving…" : "Give role"}</Button>
    </form>
  );
}

export function RemoveRoleButton({ membershipId, label }: { membershipId: number; label: string }) {
  const [state, action, pending] = useActionState(removeRole, initial);
  return (
    <form action={action} className="flex items-center gap-2">
      <input type="hidden" name="membershipId" value={membershipId} />
      <Button type="submit" variant="quiet" aria-label={label} disabled={pending}>Remove</Button>
      {state.error ? <span className="text-xs text-berry-700">{state.error}</span> : null}
    </form>
  );
}
