/**
 * Why: every generated meeting packet is kept, versioned per meeting and audience, with the hash
 * of its content and the engine version that computed it, so the packet a committee read can be
 * downloaded again and shown to be the same. A closed packet holds arm-level results: the download
 * route serves it to unblinded roles only, and listings never select the pdf column.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("packets", (t) => {
    t.increments("id").primary();
    t.integer("meeting_id").unsigned().notNullable().references("meetings.id").onDelete("CASCADE");
    t.integer("version").unsigned().notNullable();
    t.enu("audience", ["open", "closed"]).notNullable();
    t.string("content_hash", 64).notNullable();
    t.string("engine_version", 32).notNullable();
    t.integer("page_count").unsigned().notNullable();
    t.integer("byte_size").unsigned().notNullable();
    t.specificType("pdf", "LONGBLOB").notNullable();
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.integer("created_by").unsigned().nullable().references("users.id");
    t.unique(["meeting_id", "audience", "version"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("packets");
}
