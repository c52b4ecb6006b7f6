/** Why: the blinded database account reads minutes through this view only: the open session's rows. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE VIEW meeting_minutes_open AS
    SELECT id, meeting_id, session, version, body, approval_signature_id, approved_at, row_version, created_by, created_at, updated_at
    FROM meeting_minutes WHERE session = 'open'`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP VIEW IF EXISTS meeting_minutes_open");
}
