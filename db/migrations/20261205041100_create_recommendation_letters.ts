/**
 * Why: the letter that tells the sponsor the committee's recommendation (trial, look, date,
 * decision and the caution; no data and no votes), signed by the chair and kept as a versioned
 * PDF with the hash of its content. Open: the sponsor is its addressee.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("recommendation_letters", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("meeting_id").unsigned().notNullable().references("meetings.id").onDelete("CASCADE");
    t.integer("recommendation_id").unsigned().notNullable().references("recommendations.id");
    t.integer("version").unsigned().notNullable();
    t.string("content_hash", 64).notNullable();
    t.integer("page_count").unsigned().notNullable();
    t.integer("byte_size").unsigned().notNullable();
    t.specificType("pdf", "LONGBLOB").notNullable();
    t.integer("signature_id").unsigned().notNullable().references("signatures.id");
    t.integer("created_by").unsigned().nullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["meeting_id", "version"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("recommendation_letters");
}
