import type { Metadata } from "next";
import { allows, authorizePage } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchDesignVersions } from "@/db/queries/designs";
import { fetchArms } from "@/db/queries/trials";
import { designVersionJson } from "@/lib/design/serialize";
import { DesignStudio } from "@/components/design/design-studio";

export const metadata: Metadata = { title: "Design" };
export const dynamic = "force-dynamic";

/** Readable by everyone on the trial (a design is not outcome data); editable by editDesign, lockable by lockDesign. */
export default async function DesignPage({ params }: { params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial, principal } = await authorizePage(trialId, "viewOpen");
  const [versions, arms] = await Promise.all([fetchDesignVersions(trial.id), fetchArms(trial.id)]);
  const label = (role: string) => arms.find((a) => a.arm_role === role)?.label;
  return (
    <DesignStudio
      trialId={trial.id}
      designType={trial.design_type}
      armLabels={{ single: label("single"), experimental: label("experimental"), control: label("control") }}
      versions={versions.map(designVersionJson)}
      canEdit={allows(principal, "editDesign")}
      canLock={allows(principal, "lockDesign")}
    />
  );
}
