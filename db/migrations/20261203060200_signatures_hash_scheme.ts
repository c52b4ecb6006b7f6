/**
 * Why: a signature's record hash over a look's counts was plain SHA-256 of a record whose other
 * fields are open, so the counts could be recovered by trying values. New signatures are keyed
 * (HMAC-SHA256, key held outside the database); older ones keep "sha256" so an auditor knows how
 * to recompute them.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("signatures", (t) => {
    t.string("hash_scheme", 16).notNullable().defaultTo("sha256");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("signatures", (t) => {
    t.dropColumn("hash_scheme");
  });
}
