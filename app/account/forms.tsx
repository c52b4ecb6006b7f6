"use client";
import { useActionState } from "react";
import { changePassword } from "./actions";
import type { PasswordFormState } from "./schemas";
import { Button } from "@/components/ui/button";
import { Field, TextInput } from "@/components/ui/field";
import { FormErrorSummary } from "@/components/ui/form-error-summary";
import { NewPasswordFields, PasswordSetNotice } from "@/components/account/password-fields";

export function ChangePasswordForm() {
  const [state, action, pending] = useActionState(changePassword, {} as PasswordFormState);
  const fe = state.fieldErrors ?? {};
  if (state.ok) return <PasswordSetNotice message={state.ok} />;
  return (
    <form action={action} noValidate className="flex flex-col gap-3" aria-label="Change your password">
      <FormErrorSummary error={state.error} fieldErrors={state.fieldErrors} />
      <Field label="Current password" name="currentPassword" error={fe.currentPassword}>
        <TextInput id="currentPassword" name="currentPassword" type="password" autoComplete="current-password" maxLength={200} invalid={!!fe.currentPassword} />
      </Field>
      <NewPasswordFields errors={fe} hint="At least 12 characters. It is also the password you type to sign records." />
      <Button type="submit" disabled={pending}>{pending ? "Changing…" : "Change password"}</Button>
    </form>
  );
}
