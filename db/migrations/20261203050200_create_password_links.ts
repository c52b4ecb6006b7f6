/**
 * Why: the administrator must never choose or learn a signer's password. An account gets a one-time
 * set-password link instead; only the SHA-256 of its 256-bit random token is kept (a hash of a
 * high-entropy secret cannot be reversed by trying values), with its expiry and the time it was used.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("password_links", (t) => {
    t.increments("id").primary();
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.specificType("token_sha256", "CHAR(64)").notNullable().unique();
    t.dateTime("expires_at", { precision: 3 }).notNullable();
    t.dateTime("used_at", { precision: 3 }).nullable();
    t.dateTime("revoked_at", { precision: 3 }).nullable();
    t.integer("issued_by").unsigned().nullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["user_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("password_links");
}
