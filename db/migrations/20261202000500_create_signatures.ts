/**
 * Why: 21 CFR Part 11 style electronic signatures: signer, meaning, time, and a hash of the exact
 * record content signed, so a later change to the record no longer matches its signature.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("signatures", (t) => {
    t.increments("id").primary();
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.string("signer_name", 120).notNullable();
    t.string("signer_email", 254).notNullable();
    t.string("meaning", 80).notNullable();
    t.string("entity_type", 40).notNullable();
    t.integer("entity_id").unsigned().notNullable();
    t.string("record_hash", 64).notNullable();
    t.dateTime("signed_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["entity_type", "entity_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("signatures");
}
