/**
 * Why: the minutes of a meeting's open and closed sessions, drafted in the app and approved by the
 * chair's signature. Each version is a row; an approved version is never changed (a trigger
 * refuses it), so a correction is a new version. Closed minutes are closed data: blinded roles
 * read only the open rows, through the view meeting_minutes_open.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("meeting_minutes", (t) => {
    t.increments("id").primary();
    t.integer("meeting_id").unsigned().notNullable().references("meetings.id").onDelete("CASCADE");
    t.enu("session", ["open", "closed"]).notNullable();
    t.integer("version").unsigned().notNullable();
    t.text("body").notNullable();
    t.integer("approval_signature_id").unsigned().nullable().references("signatures.id");
    t.dateTime("approved_at", { precision: 3 }).nullable();
    t.integer("row_version").unsigned().notNullable().defaultTo(1);
    t.integer("created_by").unsigned().nullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["meeting_id", "session", "version"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("meeting_minutes");
}
