"use client";
import { useState, type FormEvent } from "react";
import { signIn } from "next-auth/react";
import { Button } from "./ui/button";
import { Field, TextInput } from "./ui/field";
import { Banner } from "./ui/banner";
import { DEFAULT_RETURN_TO, safeReturnTo } from "@/lib/auth/return-to";

/** `returnTo` is where the person was going (already checked by the page; checked again here). */
export function SignInForm({ returnTo = DEFAULT_RETURN_TO }: { returnTo?: string }) {
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<{ email?: string; password?: string }>({});
  const [pending, setPending] = useState(false);

  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const email = String(form.get("email") ?? "").trim();
    const password = String(form.get("password") ?? "");
    const fe: typeof fieldErrors = {};
    if (!email) fe.email = "Enter your e-mail address.";
    else if (email.length > 254 || !/^[^\s@]+@[^\s@]+$/.test(email)) fe.email = "Enter a valid e-mail address.";
    if (!password) fe.password = "Enter your password.";
    setFieldErrors(fe);
    setError(null);
    if (fe.email || fe.password) return;
    setPending(true);
    const res = await signIn("credentials", { email, password, redirect: false });
    setPending(false);
    if (!res || res.error) {
      setError(
        res?.error && res.error !== "CredentialsSignin"
          ? res.error
          : "The e-mail address or password is not correct. Check both and try again.",
      );
      return;
    }
    // A full navigation, so the header and every server component render with the new session.
    // A link's fragment (#packets in a meeting e-mail) survives the redirect to sign-in in the
    // browser's address bar but never reaches the server; carry it on if the target has none.
    const target = safeReturnTo(returnTo) ?? DEFAULT_RETURN_TO;
    const hash = !target.includes("#") && /^#[\w-]{1,64}$/.test(window.location.hash) ? window.location.hash : "";
    window.location.assign(target + hash);
  }

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign in">
      {error ? <Banner tone="danger">{error}</Banner> : null}
      <Field label="E-mail" name="email" error={fieldErrors.email}>
        <TextInput id="email" name="email" type="email" autoComplete="username" maxLength={254} invalid={!!fieldErrors.email} />
      </Field>
      <Field label="Password" name="password" error={fieldErrors.password}>
        <TextInput id="password" name="password" type="password" autoComplete="current-password" maxLength={200} invalid={!!fieldErrors.password} />
      </Field>
      <Button type="submit" disabled={pending}>
        {pending ? "Signing in…" : "Sign in"}
      </Button>
    </form>
  );
}
