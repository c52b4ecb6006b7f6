import "server-only";
/**
 * Keyed hashes for the audit chain and signature records. A plain hash of data with few possible
 * values (a look's counts) is not a secret: anyone who sees the hash and the other fields can try
 * every value. HMAC-SHA256 with a key held outside the database (CAIRN_AUDIT_KEY, made by
 * ensure_secrets into .data/secrets.env, not in the dump a backup writes) cannot be recomputed
 * without the key, so a hash no longer confirms a guess.
 */
import { createHmac, createHash } from "node:crypto";

type HashScheme = "sha256" | "hmac-sha256";
/** What new rows are written with; "sha256" is read only, for rows written before keyed hashing. */
export const CURRENT_HASH_SCHEME: HashScheme = "hmac-sha256";

export function hmacSha256Hex(key: string | Buffer, text: string): string {
  return createHmac("sha256", key).update(text).digest("hex");
}

export function sha256Hex(text: string): string {
  return createHash("sha256").update(text).digest("hex");
}

/** The server-held key; refused when missing or short, so a keyed hash never silently falls back to a plain one. */
export function auditKey(env: Record<string, string | undefined> = process.env): string {
  const k = env.CAIRN_AUDIT_KEY ?? "";
  if (k.length < 32) throw new Error("Missing configuration: CAIRN_AUDIT_KEY (at least 32 characters; start Cairn with scripts/up, which makes it)");
  return k;
}

/**
 * One key, separate uses: the purpose is bound into the message so an audit row hash can never
 * be replayed as a signature record hash or the other way round.
 */
export function keyedHash(purpose: "audit-row" | "signature-record", text: string, key: string = auditKey()): string {
  return hmacSha256Hex(key, `cairn:${purpose}:v1\n${text}`);
}

/** Recomputes a stored hash by the scheme it was written with. */
export function hashByScheme(scheme: string, purpose: "audit-row" | "signature-record", text: string, key?: string): string {
  if (scheme === "sha256") return sha256Hex(text);
  if (scheme === "hmac-sha256") return keyedHash(purpose, text, key);
  throw new Error(`unknown hash scheme "${scheme}"`);
}
