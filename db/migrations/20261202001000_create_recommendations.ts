/**
 * Why: the DMC's recommendation per reviewed analysis. The decision and date are open; the
 * rationale is closed. Never edited: a correction is a new row pointing at the one it corrects.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("recommendations", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("analysis_id").unsigned().notNullable().references("analyses.id");
    t.enu("decision", ["continue", "continue_modified", "stop_futility", "stop_efficacy", "stop_safety"]).notNullable();
    t.text("rationale").notNullable();
    t.integer("corrects_id").unsigned().nullable().references("recommendations.id");
    t.integer("signature_id").unsigned().notNullable().references("signatures.id");
    t.integer("created_by").unsigned().notNullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("recommendations");
}
