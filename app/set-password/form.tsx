"use client";
import { useActionState, useEffect, useState } from "react";
import { setPassword, type SetPasswordState } from "./actions";
import { Button } from "@/components/ui/button";
import { Field, TextInput } from "@/components/ui/field";
import { Banner } from "@/components/ui/banner";

/** The token arrives in the URL fragment, which the browser never sends to the server; the form posts it. */
export function SetPasswordForm() {
  const [state, action, pending] = useActionState(setPassword, {} as SetPasswordState);
  const [token, setToken] = useState("");
  useEffect(() => {
    const fromLink = window.location.hash.replace(/^#/, "");
    if (!fromLink) return;
    setToken(fromLink);
    // The token should not stay in the address bar or the history once read.
    window.history.replaceState(null, "", window.location.pathname);
  }, []);
  const fe = state.fieldErrors ?? {};
  if (state.ok)
    return (
      <div className="flex flex-col gap-3">
        <Banner tone="success">{state.ok}</Banner>
        <a className="text-sm underline" href="/signin">Sign in</a>
      </div>
    );
  return (
    <form action={action} noValidate className="flex flex-col gap-3" aria-label="Set your password">
      {state.error ? <Banner tone="danger">{state.error}</Banner> : null}
      <input type="hidden" name="token" value={token} />
      <Field label="New password" name="newPassword" error={fe.newPassword} hint="At least 12 characters. Only you know it; it also signs records in your name.">
        <TextInput id="newPassword" name="newPassword" type="password" autoComplete="new-password" maxLength={200} invalid={!!fe.newPassword} />
      </Field>
      <Field label="New password again" name="confirmPassword" error={fe.confirmPassword}>
        <TextInput id="confirmPassword" name="confirmPassword" type="password" autoComplete="new-password" maxLength={200} invalid={!!fe.confirmPassword} />
      </Field>
      <Button type="submit" disabled={pending}>{pending ? "Saving…" : "Set password"}</Button>
    </form>
  );
}
