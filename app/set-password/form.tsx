"use client";
import { useActionState, useEffect, useSyncExternalStore } from "react";
import { setPassword, type SetPasswordState } from "./actions";
import { Button } from "@/components/ui/button";
import { FormErrorSummary } from "@/components/ui/form-error-summary";
import { NewPasswordFields, PasswordSetNotice } from "@/components/account/password-fields";
import { FocusFirstInvalid } from "@/components/ui/focus-first-invalid";

/**
 * The link's token, read from the URL fragment once per page load and kept: the fragment is removed
 * from the address bar right after, and a failed attempt must still post the token.
 */
let linkToken: string | null = null;
function readLinkToken(): string {
  if (linkToken === null) linkToken = window.location.hash.replace(/^#/, "");
  return linkToken;
}
const noSubscription = () => () => {};

/** The token arrives in the URL fragment, which the browser never sends to the server; the form posts it. */
export function SetPasswordForm() {
  const [state, action, pending] = useActionState(setPassword, {} as SetPasswordState);
  const token = useSyncExternalStore(noSubscription, readLinkToken, () => "");
  useEffect(() => {
    // The token should not stay in the address bar or the history once read.
    if (token && window.location.hash) window.history.replaceState(null, "", window.location.pathname);
  }, [token]);
  const fe = state.fieldErrors ?? {};
  if (state.ok) return <PasswordSetNotice message={state.ok} />;
  return (
    <form action={action} noValidate className="flex flex-col gap-3" aria-label="Set your password">
      <FocusFirstInvalid after={state} />
      <FormErrorSummary error={state.error} fieldErrors={state.fieldErrors} />
      <input type="hidden" name="token" value={token} />
      <NewPasswordFields errors={fe} hint="At least 12 characters. Only you know it; it also signs records in your name." />
      <Button type="submit" disabled={pending}>{pending ? "Saving…" : "Set password"}</Button>
    </form>
  );
}
