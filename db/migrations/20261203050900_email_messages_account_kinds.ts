/** Why: two account mails join the packet and reminder mails: the set-password link and the password-changed notice. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(
    "ALTER TABLE email_messages MODIFY kind ENUM('packet_open','packet_closed_notice','meeting_reminder','password_link','password_changed') NOT NULL",
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex("email_messages").whereIn("kind", ["password_link", "password_changed"]).del();
  await knex.raw("ALTER TABLE email_messages MODIFY kind ENUM('packet_open','packet_closed_notice','meeting_reminder') NOT NULL");
}
