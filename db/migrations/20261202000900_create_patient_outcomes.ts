/** Why: closed data. Patient-level rows uploaded from the data-capture system, one per subject per look. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("patient_outcomes", (t) => {
    t.increments("id").primary();
    t.integer("analysis_id").unsigned().notNullable().references("analyses.id").onDelete("CASCADE");
    t.string("subject_id", 64).notNullable();
    t.integer("arm_id").unsigned().notNullable().references("arms.id");
    t.date("enrolled_on").notNullable();
    t.boolean("evaluable").notNullable();
    t.boolean("responder").nullable();
    t.boolean("toxicity").nullable();
    t.integer("source_line").unsigned().notNullable();
    t.unique(["analysis_id", "subject_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("patient_outcomes");
}
