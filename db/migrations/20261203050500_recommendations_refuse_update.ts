/**
 * Why: a signed record must not be altered or removed after the fact, by the application or by anyone
 * with a database account. The application's account has only SELECT and INSERT on recommendations
 * (scripts/lib/common.sh); this trigger refuses UPDATE for every account, as for audit_events.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE TRIGGER recommendations_refuse_update BEFORE UPDATE ON recommendations FOR EACH ROW
    SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'recommendations is append-only'`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP TRIGGER IF EXISTS recommendations_refuse_update");
}
