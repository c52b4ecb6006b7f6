import "server-only";
/**
 * Authorization in one place. Every page, route handler and server action calls one of these.
 * The session only says who someone is; what they may do is read from the database on every
 * request, so a removed role or deactivated account takes effect at the next request.
 */
import { headers } from "next/headers";
import { notFound, redirect, forbidden } from "next/navigation";
import { sessionClaims } from "./session";
import { fetchUserById, toPublicUser } from "@/db/queries/users";
import { fetchAnyRoleHeld } from "@/db/queries/memberships";
import { fetchAccessFacts, type AccessFacts } from "@/db/queries/trials";
import type { PublicUser, TrialRole, TrialRow } from "@/db/types";
import { allows, isUnblinded, type Capability, type Principal } from "./permissions";
import type { Knex } from "knex";
import { asClosedConnection, blindDb, db, type ClosedConnection } from "@/db/knex";
import { HttpError, forbiddenError, noteCallerClearance, notFoundError, unauthorized } from "@/lib/http";
import { authenticateApiToken, bearerToken } from "./api-tokens";
import { PAGE_PATH_HEADER, signInPathForPage } from "./return-to";

export { allows, isUnblinded, type Capability } from "./permissions";

/**
 * What a request may do on a trial, and which database connection its reads use: `reader` is the
 * blinded account for blinded roles (MariaDB refuses closed data to it) and the application's
 * account for unblinded ones; `closed` (the only way to call db/queries/closed.ts outside a write
 * transaction) exists only on an unblinded access.
 */
export type TrialAccess = { user: PublicUser; trial: TrialRow; roles: TrialRole[]; principal: Principal } & (
  | { unblinded: true; reader: Knex; closed: ClosedConnection }
  | { unblinded: false; reader: Knex; closed: null }
);

/** The closed connection of an unblinded access; a blinded one gets 403 (it never holds one). */
export function closedConnection(access: TrialAccess): ClosedConnection {
  if (!access.unblinded) throw forbiddenError("viewing closed (unblinded) results");
  return access.closed;
}

/**
 * The signed-in, active user, or null. A session issued under an older session version (the
 * account signed out, changed its password or was deactivated since) counts as no session.
 */
export async function currentUser(): Promise<PublicUser | null> {
  const claims = await sessionClaims();
  if (!claims) return null;
  const row = await fetchUserById(claims.userId);
  if (!row || !row.is_active || Number(row.session_version) !== claims.sessionVersion) return null;
  return toPublicUser(row);
}

/** For route handlers and server actions: throws HttpError (401) instead of redirecting. */
export async function requireUser(): Promise<PublicUser> {
  const u = await currentUser();
  if (!u) throw unauthorized();
  return u;
}

export async function requireAdmin(): Promise<PublicUser> {
  const u = await requireUser();
  if (!u.isAdmin) throw new HttpError(403, "Only an administrator may do this.");
  return u;
}

/** May this user create trials? Administrators, and anyone who is unblinded statistician on some trial. */
export async function mayCreateTrial(u: PublicUser): Promise<boolean> {
  return u.isAdmin || (await fetchAnyRoleHeld(u.id, "unblinded_statistician"));
}

/**
 * `bearer`: the request, for the few route handlers a machine client may call with a personal API
 * token (`Authorization: Bearer cairn_pat_...`, lib/auth/api-tokens.ts). When it carries one, the
 * token alone decides (its owner, its one trial, its one role; every use audited) and the session
 * cookie is not read. Routes that do not pass it never accept a token: signatures stay interactive.
 */
type TrialAccessOptions = { bearer?: Request };

/**
 * Trial-level check: 404 when the trial does not exist or the user is not on it (so its existence
 * is not revealed), 403 when on it without the capability.
 */
export async function requireTrialAccess(trialId: number, cap: Capability, options: TrialAccessOptions = {}): Promise<TrialAccess> {
  if (options.bearer) {
    const presented = bearerToken(options.bearer);
    if (presented !== null)
      return authenticateApiToken(presented, validTrialId(trialId), cap, { method: options.bearer.method, path: new URL(options.bearer.url).pathname }, (grant) =>
        // The token's one role, never the account's administrator flag or its other roles.
        decideTrialAccess(grant.user, { user: grant.user, sessionVersion: 0, trial: grant.trial, roles: grant.roles }, cap, { tokenScoped: true }),
      );
  }
  const claims = await sessionClaims();
  if (!claims) throw unauthorized();
  const facts = await fetchAccessFacts(claims.userId, validTrialId(trialId));
  if (!facts.user || !facts.user.isActive || facts.sessionVersion !== claims.sessionVersion) throw unauthorized();
  return decideTrialAccess(facts.user, facts, cap);
}

/** The trial-level decision for a known user; separated from the session so it can be tested against the database. */
export async function checkTrialAccess(user: PublicUser, trialId: number, cap: Capability): Promise<TrialAccess> {
  return decideTrialAccess(user, await fetchAccessFacts(user.id, validTrialId(trialId)), cap);
}

// 0 matches no trial, so a malformed id answers 404 like a missing one.
const validTrialId = (trialId: number) => (Number.isInteger(trialId) && trialId > 0 ? trialId : 0);

function decideTrialAccess(user: PublicUser, { trial, roles }: AccessFacts, cap: Capability, how: { tokenScoped?: boolean } = {}): TrialAccess {
  if (!trial) throw notFoundError("That trial");
  const principal: Principal = { isAdmin: how.tokenScoped ? false : user.isAdmin, roles };
  if (roles.length === 0 && !user.isAdmin) throw notFoundError("That trial");
  if (!allows(principal, cap)) throw forbiddenError(describe(cap));
  const unblinded = isUnblinded(principal);
  // Error messages that may quote closed values reach only unblinded callers (lib/http).
  noteCallerClearance(unblinded);
  return unblinded
    ? { user, trial, roles, principal, unblinded: true, reader: db, closed: asClosedConnection(db) }
    : { user, trial, roles, principal, unblinded: false, reader: blindDb, closed: null };
}

/**
 * For services: re-checks that an access already obtained allows `cap`, with the same 403 words as
 * requireTrialAccess, so a service called with a weaker access (a sponsor's, a DMC member's) refuses
 * before it reads or writes anything.
 */
export function assertCapability(access: TrialAccess, cap: Capability): void {
  if (!allows(access.principal, cap)) throw forbiddenError(describe(cap));
}

/** For pages: the same checks, answered the way a browser expects (sign-in redirect, 404 page, 403 page). */
export async function authorizePage(trialId: number, cap: Capability): Promise<TrialAccess> {
  try {
    return await requireTrialAccess(trialId, cap);
  } catch (e) {
    return await pageInterrupt(e);
  }
}

export async function requirePageUser(): Promise<PublicUser> {
  const u = await currentUser();
  if (!u) return await toSignIn();
  return u;
}

export async function requirePageAdmin(): Promise<PublicUser> {
  const u = await requirePageUser();
  if (!u.isAdmin) forbidden();
  return u;
}

/** A page whose session is gone: to sign-in, returning to this page (the path the proxy put on the request). */
async function toSignIn(): Promise<never> {
  redirect(signInPathForPage((await headers()).get(PAGE_PATH_HEADER)));
}

async function pageInterrupt(e: unknown): Promise<never> {
  if (e instanceof HttpError) {
    if (e.status === 401) return await toSignIn();
    if (e.status === 404) notFound();
    if (e.status === 403) forbidden();
  }
  throw e;
}

function describe(cap: Capability): string {
  const words: Record<Capability, string> = {
    viewOpen: "viewing this trial",
    viewClosed: "viewing closed (unblinded) results",
    editDesign: "editing the design",
    lockDesign: "locking the design",
    enterData: "entering interim data",
    recordRecommendation: "recording a recommendation",
    manageMeetings: "managing DMC meetings",
    manageCommittee: "changing the committee (an administrator's act)",
    viewAuditOpen: "viewing the audit trail",
    viewAuditClosed: "viewing closed audit entries",
  };
  return words[cap];
}
