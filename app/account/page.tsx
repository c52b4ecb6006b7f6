import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth";
import { Card } from "@/components/ui/card";
import { ChangePasswordForm } from "./forms";

export const metadata: Metadata = { title: "Your account" };

export default async function AccountPage() {
  const user = await requirePageUser();
  return (
    <div className="flex max-w-xl flex-col gap-5">
      <div>
        <h1>Your account</h1>
        <p className="text-sm text-stone-600">
          {user.name} &lt;{user.email}&gt;. Your password is yours alone: it signs designs, locked looks and recommendations in your name. No administrator can see or set it.
        </p>
      </div>
      <Card title="Change your password">
        <ChangePasswordForm />
      </Card>
    </div>
  );
}
