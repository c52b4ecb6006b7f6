/**
 * Why: a locked look's closed review never changes, but computing it (two arms at 400 per arm:
 * boundary tables at every look, the predictive probability line, the sensitivity analyses) takes
 * far longer than a page may. The review is computed once, in a worker thread, and kept here.
 * A row is keyed by look, review version, engine version and the SHA-256 of the review's inputs
 * (design, arms, every locked look's counts up to this one), so a corrected look, a changed
 * earlier look or a new engine simply misses the old row, which is never served. The table is
 * closed data (arm-level results): the blinded account gets no grant on it (db/classification.ts).
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("review_cache", (t) => {
    t.increments("id").primary();
    t.integer("analysis_id").unsigned().notNullable().references("analyses.id").onDelete("CASCADE");
    t.integer("review_version").unsigned().notNullable();
    t.string("engine_version", 32).notNullable();
    t.string("input_sha256", 64).notNullable();
    t.text("review_json", "longtext").notNullable();
    t.dateTime("created_at", { precision: 3 }).notNullable();
    t.unique(["analysis_id", "review_version", "engine_version", "input_sha256"], { indexName: "review_cache_key" });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("review_cache");
}
