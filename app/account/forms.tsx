"use client";
import { useActionState } from "react";
import { changePassword } from "./actions";
import type { PasswordFormState } from "./schemas";
import { Button } from "@/components/ui/button";
import { Field, TextInput } from "@/components/ui/field";
import { Banner } from "@/components/ui/banner";

export function ChangePasswordForm() {
  const [state, action, pending] = useActionState(changePassword, {} as PasswordFormState);
  const fe = state.fieldErrors ?? {};
  if (state.ok)
    return (
      <div className="flex flex-col gap-3">
        <Banner tone="success">{state.ok}</Banner>
        <a className="text-sm underline" href="/signin">Sign in</a>
      </div>
    );
  return (
    <form action={action} noValidate className="flex flex-col gap-3" aria-label="Change your password">
      {state.error ? <Banner tone="danger">{state.error}</Banner> : null}
      <Field label="Current password" name="currentPassword" error={fe.currentPassword}>
        <TextInput id="currentPassword" name="currentPassword" type="password" autoComplete="current-password" maxLength={200} invalid={!!fe.currentPassword} />
      </Field>
      <Field label="New password" name="newPassword" error={fe.newPassword} hint="At least 12 characters. It is also the password you type to sign records.">
        <TextInput id="newPassword" name="newPassword" type="password" autoComplete="new-password" maxLength={200} invalid={!!fe.newPassword} />
      </Field>
      <Field label="New password again" name="confirmPassword" error={fe.confirmPassword}>
        <TextInput id="confirmPassword" name="confirmPassword" type="password" autoComplete="new-password" maxLength={200} invalid={!!fe.confirmPassword} />
      </Field>
      <Button type="submit" disabled={pending}>{pending ? "Changing…" : "Change password"}</Button>
    </form>
  );
}
