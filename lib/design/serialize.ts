/** The JSON shape of a design version (API responses and the design page's props). */
import type { DesignRecord, DesignVersionListing } from "@/db/queries/designs";
import type { Design } from "@/lib/stats/types";

export type DesignVersionJson = {
  id: number;
  version: number;
  status: "draft" | "locked" | "superseded";
  spec: Design;
  amendmentReason: string | null;
  rowVersion: number;
  createdBy: number | null;
  createdByName: string | null;
  createdAt: string;
  lockedAt: string | null;
  signature: { signerName: string; meaning: string; signedAt: string; recordHash: string } | null;
};

const iso = (d: Date | string | null | undefined) => (d ? new Date(d).toISOString() : null);

export function designVersionJson(d: DesignRecord | DesignVersionListing): DesignVersionJson {
  const l = d as Partial<DesignVersionListing>;
  return {
    id: d.id,
    version: d.version,
    status: d.status,
    spec: d.spec,
    amendmentReason: d.amendment_reason,
    rowVersion: d.row_version,
    createdBy: d.created_by,
    createdByName: l.created_by_name ?? null,
    createdAt: iso(d.created_at) as string,
    lockedAt: iso(d.locked_at),
    signature:
      l.signer_name && l.signed_at
        ? { signerName: l.signer_name, meaning: l.signature_meaning ?? "", signedAt: iso(l.signed_at) as string, recordHash: l.record_hash ?? "" }
        : null,
  };
}
