/** Why: roles are held per trial (a person can be unblinded on one trial and sponsor on another). */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("trial_memberships", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id").onDelete("CASCADE");
    t.enu("role", ["unblinded_statistician", "dmc_member", "sponsor", "coordinator"]).notNullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["trial_id", "user_id", "role"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("trial_memberships");
}
