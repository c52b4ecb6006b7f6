import { authorizePage, allows } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { Caution } from "@/components/caution";
import { TrialNav, type TrialTab } from "@/components/trial-nav";
import { Badge } from "@/components/ui/badge";
import { ROLE_LABELS } from "@/lib/auth/permissions";

export default async function TrialLayout({ children, params }: { children: React.ReactNode; params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial, roles, principal, unblinded } = await authorizePage(trialId, "viewOpen");
  const base = `/trials/${trial.id}`;
  const tabs: TrialTab[] = [{ href: base, label: "Open status" }, { href: `${base}/design`, label: "Design" }];
  if (allows(principal, "enterData")) tabs.push({ href: `${base}/analyses`, label: "Interim data" });
  if (unblinded) tabs.push({ href: `${base}/review`, label: "Closed review" });
  // Everyone on the trial: blinded roles see the open part of each meeting only (the page decides).
  tabs.push({ href: `${base}/meetings`, label: "Meetings" });
  tabs.push({ href: `${base}/committee`, label: "Committee" });
  tabs.push({ href: `${base}/audit`, label: "Audit trail" });
  return (
    <div className="flex flex-col gap-4">
      <Caution />
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-xs font-medium uppercase tracking-wider text-stone-500">
            {trial.code} · phase {trial.phase} · {trial.design_type === "two" ? "randomised, two arms" : "single arm"}
          </p>
          <h1 className="mt-1">{trial.title}</h1>
        </div>
        <div className="flex flex-wrap gap-1.5">
          {roles.map((r) => (
            <Badge key={r} tone={r === "unblinded_statistician" || r === "dmc_member" ? "berry" : "neutral"}>
              {ROLE_LABELS[r]}
            </Badge>
          ))}
          {!unblinded ? <Badge tone="lichen">Blinded view</Badge> : <Badge tone="berry">Unblinded view</Badge>}
        </div>
      </div>
      <TrialNav tabs={tabs} />
      {children}
    </div>
  );
}
