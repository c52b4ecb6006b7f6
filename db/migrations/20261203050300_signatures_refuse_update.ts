/**
 * Why: a signed record must not be altered or removed after the fact, by the application or by anyone
 * with a database account. The application's account has only SELECT and INSERT on signatures
 * (scripts/lib/common.sh); this trigger refuses UPDATE for every account, as for audit_events.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE TRIGGER signatures_refuse_update BEFORE UPDATE ON signatures FOR EACH ROW
    SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'signatures is append-only'`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP TRIGGER IF EXISTS signatures_refuse_update");
}
