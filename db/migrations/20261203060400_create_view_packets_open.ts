/**
 * Why: the blinded database account reads packets through this view only: open-report rows,
 * without the content hash. A closed report's PDF and its hash derive from closed data.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE VIEW packets_open AS
    SELECT id, meeting_id, version, audience, engine_version, page_count, byte_size, pdf, created_at, created_by
    FROM packets WHERE audience = 'open'`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP VIEW IF EXISTS packets_open");
}
