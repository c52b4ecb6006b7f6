/**
 * The permission matrix of the product brief, as data. Pure: no session, no database. Every check
 * in the app goes through `allows`, called from lib/auth/index.ts.
 */
import type { TrialRole } from "@/db/types";

export type Capability =
  | "viewOpen" // accrual, look schedule, timeliness, recommendation decision
  | "viewClosed" // arm-level counts, posteriors, predictive probability, boundary position
  | "editDesign" // create or edit a design before lock
  | "lockDesign"
  | "enterData" // enter or upload interim data, lock an analysis
  | "recordRecommendation"
  | "manageMeetings" // schedule meetings, send packets
  | "manageCommittee" // who sits on the DMC and who chairs it (an administrator's act)
  | "viewAuditOpen"
  | "viewAuditClosed";

export type Principal = { isAdmin: boolean; roles: readonly TrialRole[] };

const BY_ROLE: Record<TrialRole, readonly Capability[]> = {
  unblinded_statistician: ["viewOpen", "viewClosed", "editDesign", "lockDesign", "enterData", "manageMeetings", "viewAuditOpen", "viewAuditClosed"],
  dmc_member: ["viewOpen", "viewClosed", "recordRecommendation", "viewAuditOpen", "viewAuditClosed"],
  sponsor: ["viewOpen", "viewAuditOpen"],
  coordinator: ["viewOpen", "manageMeetings", "viewAuditOpen"],
};

/** Being administrator never unblinds: it adds only blinded capabilities. */
const ADMIN: readonly Capability[] = ["viewOpen", "editDesign", "viewAuditOpen", "manageCommittee"];

export function allows(p: Principal, cap: Capability): boolean {
  if (p.isAdmin && ADMIN.includes(cap)) return true;
  return p.roles.some((r) => BY_ROLE[r].includes(cap));
}

/** Unblinded on this trial: may see closed results. */
export function isUnblinded(p: Principal): boolean {
  return allows(p, "viewClosed");
}

export const ROLE_LABELS: Record<TrialRole, string> = {
  unblinded_statistician: "Unblinded statistician",
  dmc_member: "DMC member",
  sponsor: "Sponsor",
  coordinator: "Trial coordinator",
};
