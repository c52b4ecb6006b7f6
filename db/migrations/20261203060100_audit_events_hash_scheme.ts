/**
 * Why: row hashes were plain SHA-256 over visible fields, so a hash of a closed row (reachable as
 * the next open row's prev_hash) could be brute-forced back to small counts. New rows are keyed
 * (HMAC-SHA256 with CAIRN_AUDIT_KEY, held outside the database); rows written before this
 * migration keep the scheme they were hashed with, so the existing chain still verifies.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("audit_events", (t) => {
    t.string("hash_scheme", 16).notNullable().defaultTo("sha256");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("audit_events", (t) => {
    t.dropColumn("hash_scheme");
  });
}
