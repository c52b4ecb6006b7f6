/** Why: arm labels are open information; the counts per arm live in closed tables. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("arms", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.string("label", 120).notNullable();
    t.enu("arm_role", ["single", "experimental", "control"]).notNullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    t.unique(["trial_id", "arm_role"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("arms");
}
