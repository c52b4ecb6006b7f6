/** Why: closed data. Per arm at a look: enrolled, evaluable, responders, toxicities. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("analysis_arm_counts", (t) => {
    t.increments("id").primary();
    t.integer("analysis_id").unsigned().notNullable().references("analyses.id").onDelete("CASCADE");
    t.integer("arm_id").unsigned().notNullable().references("arms.id");
    t.integer("enrolled").unsigned().notNullable();
    t.integer("evaluable").unsigned().notNullable();
    t.integer("responders").unsigned().notNullable();
    t.integer("toxicities").unsigned().nullable();
    t.unique(["analysis_id", "arm_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("analysis_arm_counts");
}
