/**
 * Why: at the start of each meeting every voting member declares, with a signature, either no new
 * conflicts of interest or a stated conflict; a member with a declared conflict does not vote on
 * that look. One declaration per member and meeting, never edited.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("conflict_declarations", (t) => {
    t.increments("id").primary();
    t.integer("meeting_id").unsigned().notNullable().references("meetings.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.boolean("has_conflict").notNullable();
    t.text("statement").nullable();
    t.integer("signature_id").unsigned().notNullable().references("signatures.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["meeting_id", "user_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("conflict_declarations");
}
