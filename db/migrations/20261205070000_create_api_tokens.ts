/**
 * Why: a data-capture export job must upload counts and read the open status without a browser
 * session. Each personal API token belongs to one account, one trial and the role its owner held
 * there; only the SHA-256 of its 256-bit random secret is kept (a hash of a high-entropy secret
 * cannot be reversed by trying values), with its expiry and the time it was revoked.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("api_tokens", (t) => {
    t.increments("id").primary();
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.integer("trial_id").unsigned().notNullable().references("trials.id");
    t.enu("role", ["unblinded_statistician", "dmc_member", "sponsor", "coordinator"]).notNullable();
    t.string("label", 80).notNullable();
    t.specificType("token_sha256", "CHAR(64)").notNullable().unique();
    t.dateTime("expires_at", { precision: 3 }).notNullable();
    t.dateTime("revoked_at", { precision: 3 }).nullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["user_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("api_tokens");
}
