/** Why: account mails (a set-password link, a notice that the password changed) belong to no trial. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw("ALTER TABLE email_messages MODIFY trial_id INT UNSIGNED NULL");
}

export async function down(knex: Knex): Promise<void> {
  await knex("email_messages").whereNull("trial_id").del();
  await knex.raw("ALTER TABLE email_messages MODIFY trial_id INT UNSIGNED NOT NULL");
}
