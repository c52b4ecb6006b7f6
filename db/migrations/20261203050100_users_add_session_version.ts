/**
 * Why: a signed session (JWT) stays valid until it expires, so signing out, changing the password or
 * deactivating an account could not end copies of it. Each session carries the account's
 * session_version; lib/auth compares it with this column on every request, and those events bump it.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("users", (t) => {
    t.integer("session_version").unsigned().notNullable().defaultTo(0);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("users", (t) => {
    t.dropColumn("session_version");
  });
}
