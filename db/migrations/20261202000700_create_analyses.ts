/**
 * Why: one row per planned look. Only open information lives here (look number, planned size,
 * cut-off, status, pooled enrolment); arm-level counts are in analysis_arm_counts, which queries
 * for blinded roles never touch.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("analyses", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("design_id").unsigned().notNullable().references("designs.id");
    t.integer("look_number").unsigned().notNullable();
    t.integer("planned_n").unsigned().notNullable();
    t.date("cutoff_date").nullable();
    t.integer("enrolled_total").unsigned().nullable();
    t.enu("status", ["planned", "open", "locked", "reviewed"]).notNullable().defaultTo("planned");
    t.integer("amendment_count").unsigned().notNullable().defaultTo(0);
    t.integer("row_version").unsigned().notNullable().defaultTo(1);
    t.integer("lock_signature_id").unsigned().nullable().references("signatures.id");
    t.dateTime("locked_at", { precision: 3 }).nullable();
    t.dateTime("reviewed_at", { precision: 3 }).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["trial_id", "look_number"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("analyses");
}
