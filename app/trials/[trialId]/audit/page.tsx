import type { Metadata } from "next";
import { allows, authorizePage } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchAuditEvents } from "@/db/audit";
import { Card } from "@/components/ui/card";
import { AuditGrid } from "@/components/audit/audit-grid";
import { auditEntryJson } from "@/lib/audit/audit-json";

export const metadata: Metadata = { title: "Audit trail" };

export default async function AuditPage({ params }: { params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial, principal } = await authorizePage(trialId, "viewAuditOpen");
  // Blinded roles: closed rows are filtered in SQL, so they never reach this server component.
  const openOnly = !allows(principal, "viewAuditClosed");
  const rows = await fetchAuditEvents({ trialId: trial.id, openOnly });
  return (
    <Card title="Audit trail">
      {rows.length === 0 ? (
        <p className="text-sm text-stone-600">No audit entries for this trial yet.</p>
      ) : (
        <AuditGrid entries={rows.map((r) => auditEntryJson(r, { hashes: !openOnly }))} openOnly={openOnly} trialCode={trial.code} />
      )}
    </Card>
  );
}
