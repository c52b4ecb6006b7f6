/**
 * Why: a recommendation made by a committee names the meeting it was made at and carries the
 * tally of the votes and any dissent, all closed (only meeting_id is a plain reference). One
 * ALTER statement, so the three columns come or go together.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(
    "ALTER TABLE recommendations ADD COLUMN meeting_id INT UNSIGNED NULL, ADD COLUMN tally_json TEXT NULL, ADD COLUMN dissent TEXT NULL, ADD CONSTRAINT recommendations_meeting_id_foreign FOREIGN KEY (meeting_id) REFERENCES meetings (id)",
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("ALTER TABLE recommendations DROP FOREIGN KEY recommendations_meeting_id_foreign");
  await knex.raw("ALTER TABLE recommendations DROP INDEX recommendations_meeting_id_foreign, DROP COLUMN meeting_id, DROP COLUMN tally_json, DROP COLUMN dissent");
}
