import "server-only";
/** One-time set-password links (lib/auth/password-links.ts issues and redeems them). */
import type { Tx } from "../knex";
import type { PasswordLinkRow } from "../types";

export async function insertPasswordLink(tx: Tx, l: { userId: number; tokenSha256: string; expiresAt: Date; issuedBy: number | null }): Promise<number> {
  const [id] = await tx("password_links").insert({ user_id: l.userId, token_sha256: l.tokenSha256, expires_at: l.expiresAt, issued_by: l.issuedBy });
  return id;
}

/** Every link of the account not used yet stops working (a newer one was issued, or one was used). */
export async function revokeOpenPasswordLinks(tx: Tx, userId: number, at: Date): Promise<number> {
  return tx("password_links").where({ user_id: userId }).whereNull("used_at").whereNull("revoked_at").update({ revoked_at: at });
}

/** The link with this token hash, locked for the redeeming transaction, whatever its state. */
export async function fetchPasswordLinkForUpdate(tx: Tx, tokenSha256: string): Promise<PasswordLinkRow | undefined> {
  return tx<PasswordLinkRow>("password_links").where({ token_sha256: tokenSha256 }).forUpdate().first();
}

export async function fetchPasswordLinkByHash(tx: Tx, tokenSha256: string): Promise<PasswordLinkRow | undefined> {
  return tx<PasswordLinkRow>("password_links").where({ token_sha256: tokenSha256 }).first();
}

export async function markPasswordLinkUsed(tx: Tx, id: number, at: Date): Promise<number> {
  return tx("password_links").where({ id }).whereNull("used_at").whereNull("revoked_at").update({ used_at: at });
}
