/**
 * Why: each voting member's signed vote on the look of a meeting, with an optional comment. Votes,
 * comments and anything counted from them are closed data: the blinded account has no grant on
 * this table (db/classification.ts), so not even a count reaches a blinded role.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("committee_votes", (t) => {
    t.increments("id").primary();
    t.integer("meeting_id").unsigned().notNullable().references("meetings.id").onDelete("CASCADE");
    t.integer("analysis_id").unsigned().notNullable().references("analyses.id");
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.enu("decision", ["continue", "continue_modified", "stop_futility", "stop_efficacy", "stop_safety"]).notNullable();
    t.text("comment").nullable();
    t.integer("signature_id").unsigned().notNullable().references("signatures.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["meeting_id", "user_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("committee_votes");
}
