import type { Metadata } from "next";
import Link from "next/link";
import { authorizePage } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchAnalysesOpen } from "@/db/queries/analyses";
import { fetchLockedDesign } from "@/db/queries/designs";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { ANALYSIS_STATUS_LABELS } from "@/lib/format";
import { STATUS_TONES } from "@/components/analyses/status";

export const metadata: Metadata = { title: "Interim data" };

function lookVerb(status: string): string {
  return status === "planned" ? "Start" : status === "open" ? "Enter data" : "View";
}

export default async function AnalysesPage({ params }: { params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial } = await authorizePage(trialId, "enterData");
  const [looks, design] = await Promise.all([fetchAnalysesOpen(trial.id), fetchLockedDesign(trial.id)]);
  return (
    <Card title="Interim analyses">
      {!design ? (
        <p className="text-sm text-stone-600">
          There is no locked design yet. The looks are created when a design is locked: see <Link href={`/trials/${trial.id}/design`}>Design</Link>.
        </p>
      ) : null}
      {looks.length === 0 ? (
        design ? <p className="text-sm text-stone-600">The locked design has no looks.</p> : null
      ) : (
        <table className="cairn-table" aria-label="Looks">
          <thead>
            <tr>
              <th scope="col">Look</th>
              <th scope="col">Planned size{trial.design_type === "two" ? " (per arm)" : ""}</th>
              <th scope="col">Data cut-off</th>
              <th scope="col">Enrolled (pooled)</th>
              <th scope="col">Status</th>
              <th scope="col">Amendments</th>
              <th scope="col"><span className="sr-only">Open</span></th>
            </tr>
          </thead>
          <tbody>
            {looks.map((l) => (
              <tr key={l.id} data-testid={`look-row-${l.look_number}`}>
                <td>{l.look_number}</td>
                <td>{l.planned_n}</td>
                <td>{l.cutoff_date ?? "—"}</td>
                <td>{l.enrolled_total ?? "—"}</td>
                <td>
                  <Badge tone={STATUS_TONES[l.status]}>{ANALYSIS_STATUS_LABELS[l.status]}</Badge>
                </td>
                <td>{l.amendment_count}</td>
                <td>
                  {/* The accessible name starts with the visible word (WCAG 2.5.3) and says which look. */}
                  <Link href={`/trials/${trial.id}/analyses/${l.id}`} aria-label={`${lookVerb(l.status)}: look ${l.look_number}`}>
                    {lookVerb(l.status)}
                  </Link>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </Card>
  );
}
