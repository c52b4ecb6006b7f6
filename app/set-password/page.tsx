import type { Metadata } from "next";
import { SetPasswordForm } from "./form";

export const metadata: Metadata = { title: "Set your password", referrer: "no-referrer" };

/** Public page: whoever holds a valid set-password link may use it once. */
export default function SetPasswordPage() {
  return (
    <div className="mx-auto mt-10 max-w-md">
      <h1>Set your Cairn password</h1>
      <p className="mt-2 text-sm text-stone-600">Choose the password you will sign in and sign records with. The link you followed works once.</p>
      <div className="mt-6 rounded-card border border-stone-200 bg-white p-6">
        <SetPasswordForm />
      </div>
    </div>
  );
}
