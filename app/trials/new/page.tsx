import type { Metadata } from "next";
import { forbidden } from "next/navigation";
import { mayCreateTrial, requirePageUser } from "@/lib/auth";
import { Card } from "@/components/ui/card";
import { NewTrialForm } from "./new-trial-form";

export const metadata: Metadata = { title: "New trial" };

export default async function NewTrialPage() {
  const user = await requirePageUser();
  if (!(await mayCreateTrial(user))) forbidden();
  return (
    <div className="flex max-w-3xl flex-col gap-4">
      <div>
        <h1>New trial</h1>
        <p className="text-sm text-stone-600">
          Register the trial, then set its design (priors, looks, monitoring rule) before the first patient.
          {user.isAdmin ? " As administrator you stay blinded: give the unblinded statistician their role on the new trial." : " You become the trial's unblinded statistician."}
        </p>
      </div>
      <Card>
        <NewTrialForm />
      </Card>
    </div>
  );
}
