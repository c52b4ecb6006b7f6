import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth";
import { Card } from "@/components/ui/card";
import { ChangePasswordForm, CreateApiTokenForm, RevokeApiTokenButton } from "./forms";
import { fetchApiTokensOfUser, fetchRolesOfUser } from "@/db/queries/api-tokens";
import { MAX_TOKEN_DAYS } from "@/lib/auth/api-tokens";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { Badge } from "@/components/ui/badge";

export const metadata: Metadata = { title: "Your account" };

export default async function AccountPage() {
  const user = await requirePageUser();
  const [tokens, roles] = await Promise.all([fetchApiTokensOfUser(user.id), fetchRolesOfUser(user.id)]);
  const now = Date.now();
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
      <Card title="API tokens">
        <p className="mb-3 text-sm text-stone-600">
          For a program that uploads this trial&apos;s counts or patient file, or reads its open status, without a browser. A token acts for you on one
          trial with one of your roles there, never more; it cannot sign anything (signatures need you and your password). Every use is recorded in the
          trial&apos;s audit trail. Cairn keeps only a hash: the token is shown once, when it is made.
        </p>
        <CreateApiTokenForm scopes={roles.map((r) => ({ value: `${r.trial_id}:${r.role}`, label: `${r.code}: ${ROLE_LABELS[r.role]}` }))} maxDays={MAX_TOKEN_DAYS} />
        {tokens.length > 0 ? (
          <ul className="mt-4 flex flex-col gap-2" aria-label="Your API tokens">
            {tokens.map((t) => {
              const state = t.revoked_at ? "revoked" : new Date(t.expires_at).getTime() <= now ? "expired" : "active";
              return (
                <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 rounded-md border border-stone-200 px-3 py-2 text-sm" data-testid="api-token-row">
                  <span>
                    <strong>{t.label}</strong> · {t.trial_code}, {ROLE_LABELS[t.role]} · expires {new Date(t.expires_at).toISOString().slice(0, 10)}{" "}
                    <Badge tone={state === "active" ? "teal" : "neutral"}>{state}</Badge>
                  </span>
                  {state === "active" ? <RevokeApiTokenButton tokenId={t.id} label={t.label} /> : null}
                </li>
              );
            })}
          </ul>
        ) : null}
      </Card>
    </div>
  );
}
