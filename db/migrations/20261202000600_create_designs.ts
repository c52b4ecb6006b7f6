/** Why: designs are versioned; the locked version is the charter version and never changes. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("designs", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("version").unsigned().notNullable();
    t.enu("status", ["draft", "locked", "superseded"]).notNullable().defaultTo("draft");
    t.text("spec", "longtext").notNullable();
    t.text("amendment_reason").nullable();
    t.integer("row_version").unsigned().notNullable().defaultTo(1);
    t.integer("signature_id").unsigned().nullable().references("signatures.id");
    t.integer("created_by").unsigned().nullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.dateTime("locked_at", { precision: 3 }).nullable();
    t.unique(["trial_id", "version"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("designs");
}
