/** Why: approved minutes are a signed record: no account may change one (a correction is a new version). */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(`CREATE TRIGGER meeting_minutes_refuse_approved_update BEFORE UPDATE ON meeting_minutes FOR EACH ROW
    BEGIN
      IF OLD.approval_signature_id IS NOT NULL THEN
        SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'approved minutes are never changed';
      END IF;
    END`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP TRIGGER IF EXISTS meeting_minutes_refuse_approved_update");
}
