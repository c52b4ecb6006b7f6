/**
 * Separation of duties for trial roles, as data and one pure check (no session, no database).
 * The product brief keeps the blinded side (sponsor, trial coordinator) apart from the unblinded
 * side (unblinded statistician, DMC member): one person on both sides of one trial would carry
 * closed results into the sponsor's or the site's decisions. And no administrator unblinds
 * themselves: a second administrator must give them an unblinded role.
 */
import type { TrialRole } from "@/db/types";

const UNBLINDED_ROLES: readonly TrialRole[] = ["unblinded_statistician", "dmc_member"];
const BLINDED_SIDE_ROLES: readonly TrialRole[] = ["sponsor", "coordinator"];

const WORDS: Record<TrialRole, string> = {
  unblinded_statistician: "unblinded statistician",
  dmc_member: "DMC member",
  sponsor: "sponsor",
  coordinator: "trial coordinator",
};

/**
 * Why this role may not be given, or null when it may.
 * @param granterId the administrator giving the role
 * @param granteeId the person receiving it
 * @param heldOnTrial the roles the person already holds on that trial
 */
export function roleGrantRefusal(granterId: number, granteeId: number, role: TrialRole, heldOnTrial: readonly TrialRole[]): string | null {
  if (granterId === granteeId && UNBLINDED_ROLES.includes(role))
    return `You cannot give yourself an unblinded role (${WORDS[role]}). A second administrator must give it to you.`;
  const clash = UNBLINDED_ROLES.includes(role)
    ? heldOnTrial.find((r) => BLINDED_SIDE_ROLES.includes(r))
    : BLINDED_SIDE_ROLES.includes(role)
      ? heldOnTrial.find((r) => UNBLINDED_ROLES.includes(r))
      : undefined;
  if (clash)
    return `This person is ${WORDS[clash]} on this trial, so they cannot also be ${WORDS[role]}: the blinded and unblinded sides of a trial are held by different people. Remove the ${WORDS[clash]} role first if the change is intended.`;
  return null;
}
