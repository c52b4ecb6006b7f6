/** Why: the recommendation letter to the sponsor joins the e-mails Cairn sends. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw(
    "ALTER TABLE email_messages MODIFY kind ENUM('packet_open','packet_closed_notice','meeting_reminder','password_link','password_changed','recommendation_letter') NOT NULL",
  );
}

export async function down(knex: Knex): Promise<void> {
  await knex("email_messages").where("kind", "recommendation_letter").del();
  await knex.raw("ALTER TABLE email_messages MODIFY kind ENUM('packet_open','packet_closed_notice','meeting_reminder','password_link','password_changed') NOT NULL");
}
