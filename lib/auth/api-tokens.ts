import "server-only";
/**
 * Personal API tokens for machine clients (a data-capture export job uploading counts or a patient
 * CSV, reading the open status). A token belongs to its owner, one trial and the role the owner held
 * there when it was made; it expires (at most MAX_TOKEN_DAYS), can be revoked, and every use is an
 * open audit row. It never grants more than that one role, and only while the owner still holds it
 * and the account is active. Only route handlers that opt in (`requireTrialAccess(..., { bearer: req })`)
 * accept one; everything else, signatures included, stays interactive (a session and, for a
 * signature, the password typed again).
 */
import { createHash, randomBytes, timingSafeEqual } from "node:crypto";
import { z } from "zod";
import { writeTransaction } from "@/db/knex";
import { appendAudit, recordAuditEvent } from "@/db/audit";
import { fetchApiTokenByHash, fetchApiTokenOfUserForUpdate, insertApiToken, markApiTokenRevoked } from "@/db/queries/api-tokens";
import { fetchAccessFacts } from "@/db/queries/trials";
import type { ApiTokenRow, PublicUser, TrialRole, TrialRow } from "@/db/types";
import { TRIAL_ROLES } from "@/db/types";
import { HttpError, notFoundError } from "@/lib/http";
import type { Capability } from "./permissions";

/** Longest life of a token; an export job's owner renews it at least this often. */
export const MAX_TOKEN_DAYS = 90;
/** Every token starts with this, so a leaked one is recognisable (e.g. by secret scanners) and the bearer check can tell it from other schemes. */
const TOKEN_PREFIX = "cairn_pat_";
const SECRET_BYTES = 32;
const TOKEN_PATTERN = /^cairn_pat_[A-Za-z0-9_-]{43}$/;

/**
 * The stored form of a token. A plain SHA-256 is enough here, unlike for passwords: the secret is
 * 32 random bytes (256 bits), so nobody can find it from the hash by trying values, and a fast
 * hash keeps the per-request check cheap. The hash is looked up by equality (a unique index).
 */
function hashApiToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

/** A new token: the prefix and 32 random bytes in base64url. */
function newApiTokenSecret(): string {
  return TOKEN_PREFIX + randomBytes(SECRET_BYTES).toString("base64url");
}

const createApiTokenSchema = z.object({
  trialId: z.coerce.number({ message: "Choose a trial." }).int("Choose a trial.").positive("Choose a trial."),
  role: z.enum(TRIAL_ROLES, { message: "Choose one of your roles on that trial." }),
  label: z
    .string({ message: "Name the token (for example the job that uses it)." })
    .trim()
    .min(1, "Name the token (for example the job that uses it).")
    .max(80, "At most 80 characters.")
    .refine((s) => !/[\u0000-\u001f\u007f]/.test(s), "Use plain text without control characters."),
  days: z.coerce
    .number({ message: `Enter a number of days from 1 to ${MAX_TOKEN_DAYS}.` })
    .int(`Enter a whole number of days from 1 to ${MAX_TOKEN_DAYS}.`)
    .min(1, `Enter a number of days from 1 to ${MAX_TOKEN_DAYS}.`)
    .max(MAX_TOKEN_DAYS, `A token lives at most ${MAX_TOKEN_DAYS} days.`),
});

/**
 * Makes a token for the owner on one trial, with a role the owner holds there. The secret is
 * returned once and never stored.
 * @throws HttpError 404 when the owner holds no such role on that trial; ZodError for bad input.
 */
export async function createApiToken(owner: PublicUser, raw: unknown, now: Date = new Date()): Promise<{ id: number; token: string; expiresAt: Date; trialCode: string }> {
  const input = createApiTokenSchema.parse(raw);
  const facts = await fetchAccessFacts(owner.id, input.trialId);
  // Same answer for a trial that does not exist and one the owner has no such role on.
  if (!facts.trial || !facts.roles.includes(input.role)) throw notFoundError("That role on that trial");
  const token = newApiTokenSecret();
  const expiresAt = new Date(now.getTime() + input.days * 86_400_000);
  const trial = facts.trial;
  const id = await writeTransaction(async (tx) => {
    const id = await insertApiToken(tx, { userId: owner.id, trialId: trial.id, role: input.role, label: input.label, tokenSha256: hashApiToken(token), expiresAt });
    await appendAudit(tx, {
      actorUserId: owner.id,
      actorEmail: owner.email,
      trialId: trial.id,
      action: "api_token_created",
      entityType: "api_token",
      entityId: id,
      visibility: "open",
      newValues: { label: input.label, role: input.role, expiresAt: expiresAt.toISOString() },
    });
    return id;
  });
  return { id, token, expiresAt, trialCode: trial.code };
}

/**
 * Revokes one of the owner's tokens; it stops working at the next request.
 * @throws HttpError 404 when it is not the owner's, 409 when it was already revoked.
 */
export async function revokeApiToken(owner: PublicUser, tokenId: number, now: Date = new Date()): Promise<void> {
  if (!Number.isInteger(tokenId) || tokenId <= 0) throw notFoundError("That token");
  await writeTransaction(async (tx) => {
    const row = await fetchApiTokenOfUserForUpdate(tx, owner.id, tokenId);
    if (!row) throw notFoundError("That token");
    if (row.revoked_at) throw new HttpError(409, "That token was already revoked.");
    await markApiTokenRevoked(tx, row.id, now);
    await appendAudit(tx, { actorUserId: owner.id, actorEmail: owner.email, trialId: row.trial_id, action: "api_token_revoked", entityType: "api_token", entityId: row.id, visibility: "open", newValues: { label: row.label } });
  });
}

/** The token in an `Authorization: Bearer ...` header, or null when the request carries none. */
export function bearerToken(req: Request): string | null {
  const h = req.headers.get("authorization");
  if (!h) return null;
  const m = /^Bearer\s+(\S+)\s*$/i.exec(h);
  return m ? m[1] : "";
}

const invalidToken = () => new HttpError(401, "That API token is not valid: it is unknown, expired or revoked. Its owner can make a new one on their account page.");

/** Who a token acts for, on which trial, with which single role. */
type TokenGrant = { token: ApiTokenRow; user: PublicUser; trial: TrialRow; roles: TrialRole[] };

/**
 * Checks a presented token for one request on one trial, then lets `decide` grant or refuse the
 * capability. Every decision about a known token, accepted or refused, is an open audit row (the
 * secret never is; the token's id is).
 * @throws HttpError 401 for a malformed, unknown, expired or revoked token, or an owner no longer
 *   active or no longer holding the token's role; 404 when the token is for another trial; what
 *   `decide` throws (403 when the role lacks the capability).
 */
export async function authenticateApiToken<T>(
  presented: string,
  trialId: number,
  cap: Capability,
  what: { method: string; path: string },
  decide: (grant: TokenGrant) => T,
  now: Date = new Date(),
): Promise<T> {
  if (!TOKEN_PATTERN.test(presented)) throw invalidToken();
  const hash = hashApiToken(presented);
  const token = await fetchApiTokenByHash(hash);
  // The index found it by equality; the constant-time comparison is belt and braces.
  if (!token || !timingSafeEqual(Buffer.from(token.token_sha256), Buffer.from(hash))) throw invalidToken();
  // Facts on the token's own trial: the owner's account and the roles still held there.
  const facts = await fetchAccessFacts(token.user_id, token.trial_id);
  const audit = (outcome: string) =>
    recordAuditEvent({
      actorUserId: token.user_id,
      actorEmail: facts.user?.email ?? null,
      trialId: token.trial_id,
      action: outcome === "accepted" ? "api_token_used" : "api_token_refused",
      entityType: "api_token",
      entityId: token.id,
      visibility: "open",
      newValues: { outcome, method: what.method, path: what.path, capability: cap, ...(trialId !== token.trial_id ? { requestedTrialId: trialId } : {}) },
    });
  if (token.revoked_at) {
    await audit("revoked");
    throw invalidToken();
  }
  if (new Date(token.expires_at).getTime() <= now.getTime()) {
    await audit("expired");
    throw invalidToken();
  }
  // A token for trial A tells nothing about trial B: the same 404 as for a trial one is not on.
  if (token.trial_id !== trialId || !facts.trial) {
    await audit("other trial");
    throw notFoundError("That trial");
  }
  if (!facts.user || !facts.user.isActive) {
    await audit("owner inactive");
    throw invalidToken();
  }
  if (!facts.roles.includes(token.role)) {
    await audit("role no longer held");
    throw invalidToken();
  }
  let out: T;
  try {
    out = decide({ token, user: facts.user, trial: facts.trial, roles: [token.role] });
  } catch (e) {
    await audit(e instanceof HttpError ? `refused ${e.status}` : "refused");
    throw e;
  }
  await audit("accepted");
  return out;
}
