import "server-only";
import type { Tx } from "../knex";
import type { SignatureRow } from "../types";
import { CURRENT_HASH_SCHEME, keyedHash } from "../keyed-hash";
import { canonicalJson } from "@/lib/canonical-json";

/**
 * Keyed hash of the exact record content being signed (stable key order), binding the signature
 * to it. Keyed because a record of a look's counts has few possible values: a plain hash of it
 * would give the counts away to anyone who can see the hash and try values.
 */
export function recordHash(record: unknown, key?: string): string {
  return keyedHash("signature-record", stableStringify(record), key);
}

/** The signed record's text: the one canonical JSON (kept under this name for the attack tests). */
export const stableStringify = canonicalJson;

type SignatureMeaning =
  | "design approved"
  | "analysis locked"
  | "recommendation recorded"
  | "review reopened for correction"
  | "conflict of interest declared"
  | "vote cast"
  | "minutes approved"
  | "recommendation letter signed";

export async function insertSignature(
  tx: Tx,
  s: { userId: number; signerName: string; signerEmail: string; meaning: SignatureMeaning; entityType: string; entityId: number; record: unknown; signedAt?: Date },
): Promise<SignatureRow> {
  const row = {
    user_id: s.userId,
    signer_name: s.signerName,
    signer_email: s.signerEmail,
    meaning: s.meaning,
    entity_type: s.entityType,
    entity_id: s.entityId,
    record_hash: recordHash(s.record),
    hash_scheme: CURRENT_HASH_SCHEME,
    // Only the demo seed passes signedAt (its invented story is dated in the past); the app signs now.
    signed_at: s.signedAt ?? new Date(),
  };
  const [id] = await tx("signatures").insert(row);
  return { id, ...row };
}

