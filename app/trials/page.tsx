import type { Metadata } from "next";
import Link from "next/link";
import { mayCreateTrial, requirePageUser } from "@/lib/auth";
import { buttonClass } from "@/components/ui/button";
import { fetchTrialsForUser } from "@/db/queries/trials";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { Badge } from "@/components/ui/badge";
import { Card } from "@/components/ui/card";

export const metadata: Metadata = { title: "Trials" };

export default async function TrialsPage() {
  const user = await requirePageUser();
  const [trials, mayCreate] = await Promise.all([fetchTrialsForUser(user.id, user.isAdmin), mayCreateTrial(user)]);
  return (
    <div className="flex flex-col gap-5">
      <div>
        {mayCreate ? (
          <Link href="/trials/new" className={buttonClass("primary", "float-right no-underline")}>
            New trial
          </Link>
        ) : null}
        <h1>Trials</h1>
        <p className="text-sm text-stone-600">The trials you hold a role on{user.isAdmin ? " (as administrator you see every trial, blinded)" : ""}.</p>
      </div>
      {trials.length === 0 ? (
        <Card>
          <p className="text-sm text-stone-600">You are not on any trial yet. An administrator adds people to trials and gives them a role.</p>
        </Card>
      ) : (
        <ul className="grid gap-4 md:grid-cols-2" aria-label="Your trials">
          {trials.map((t) => (
            <li key={t.id}>
              <Card>
                <div className="flex flex-col gap-2">
                  <div className="flex items-baseline justify-between gap-2">
                    <Link href={`/trials/${t.id}`} className="text-lg font-semibold">
                      {t.code}
                    </Link>
                    <span className="text-xs text-stone-500">{t.design_type === "two" ? "Randomised, two arms" : "Single arm"}</span>
                  </div>
                  <p className="text-sm text-stone-800">{t.title}</p>
                  <p className="text-xs text-stone-500">Sponsor: {t.sponsor_name}</p>
                  <div className="flex flex-wrap gap-1.5" data-testid={`roles-${t.code}`}>
                    {t.roles.map((r) => (
                      <Badge key={r} tone={r === "unblinded_statistician" || r === "dmc_member" ? "berry" : "neutral"}>
                        {ROLE_LABELS[r]}
                      </Badge>
                    ))}
                    {t.roles.length === 0 && user.isAdmin ? <Badge>Administrator (blinded)</Badge> : null}
                  </div>
                </div>
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
