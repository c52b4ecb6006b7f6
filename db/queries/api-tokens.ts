import "server-only";
/** Personal API tokens (lib/auth/api-tokens.ts issues, checks and revokes them). */
import { db, type Tx } from "../knex";
import type { ApiTokenRow, TrialRole } from "../types";

export async function insertApiToken(tx: Tx, t: { userId: number; trialId: number; role: TrialRole; label: string; tokenSha256: string; expiresAt: Date }): Promise<number> {
  const [id] = await tx("api_tokens").insert({ user_id: t.userId, trial_id: t.trialId, role: t.role, label: t.label, token_sha256: t.tokenSha256, expires_at: t.expiresAt });
  return id;
}

/** The token with this secret's hash, whatever its state (the caller decides and says why it is refused). */
export async function fetchApiTokenByHash(tokenSha256: string, tx: Tx = db): Promise<ApiTokenRow | undefined> {
  return tx<ApiTokenRow>("api_tokens").where({ token_sha256: tokenSha256 }).first();
}

type ApiTokenListing = Omit<ApiTokenRow, "token_sha256"> & { trial_code: string };

/** An account's tokens, newest first, with the trial's code; never the hash. */
export async function fetchApiTokensOfUser(userId: number, tx: Tx = db): Promise<ApiTokenListing[]> {
  return tx("api_tokens as k")
    .join("trials as t", "t.id", "k.trial_id")
    .where("k.user_id", userId)
    .orderBy("k.id", "desc")
    .select("k.id", "k.user_id", "k.trial_id", "k.role", "k.label", "k.expires_at", "k.revoked_at", "k.created_at", { trial_code: "t.code" });
}

/** The owner's token, locked for the revoking transaction. */
export async function fetchApiTokenOfUserForUpdate(tx: Tx, userId: number, id: number): Promise<ApiTokenRow | undefined> {
  return tx<ApiTokenRow>("api_tokens").where({ id, user_id: userId }).forUpdate().first();
}

export async function markApiTokenRevoked(tx: Tx, id: number, at: Date): Promise<number> {
  return tx("api_tokens").where({ id }).whereNull("revoked_at").update({ revoked_at: at });
}

/** The trials where the account holds a role, with the roles (the token form's choices). */
export async function fetchRolesOfUser(userId: number, tx: Tx = db): Promise<{ trial_id: number; code: string; role: TrialRole }[]> {
  return tx("trial_memberships as m").join("trials as t", "t.id", "m.trial_id").where("m.user_id", userId).orderBy(["t.code", "m.role"]).select("m.trial_id", "t.code", "m.role");
}
