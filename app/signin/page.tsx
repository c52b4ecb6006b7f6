import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { currentUser } from "@/lib/auth";
import { SignInForm } from "@/components/sign-in-form";
import { DEFAULT_RETURN_TO, safeReturnTo } from "@/lib/auth/return-to";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const returnTo = safeReturnTo((await searchParams).callbackUrl) ?? DEFAULT_RETURN_TO;
  if (await currentUser().catch(() => null)) redirect(returnTo);
  return (
    <div className="mx-auto mt-10 max-w-md">
      <h1>Sign in to Cairn</h1>
      <p className="mt-2 text-sm text-stone-600">
        Bayesian interim monitoring for trials with a binary endpoint. Your access depends on the role you hold on each trial.
      </p>
      <div className="mt-6 rounded-card border border-stone-200 bg-white p-6">
        <SignInForm returnTo={returnTo} />
      </div>
    </div>
  );
}
