/** Why: people who sign in. Roles are per trial (trial_memberships); is_admin is the only global role. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("users", (t) => {
    t.increments("id").primary();
    t.string("email", 254).notNullable().unique();
    t.string("name", 120).notNullable();
    t.string("password_hash", 100).notNullable();
    t.boolean("is_admin").notNullable().defaultTo(false);
    t.boolean("is_active").notNullable().defaultTo(true);
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("users");
}
