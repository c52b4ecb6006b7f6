/** Why: a letter e-mail names the letter version it carries as its attachment. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.raw("ALTER TABLE email_messages ADD COLUMN letter_id INT UNSIGNED NULL, ADD CONSTRAINT email_messages_letter_id_foreign FOREIGN KEY (letter_id) REFERENCES recommendation_letters (id)");
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("ALTER TABLE email_messages DROP FOREIGN KEY email_messages_letter_id_foreign");
  await knex.raw("ALTER TABLE email_messages DROP INDEX email_messages_letter_id_foreign, DROP COLUMN letter_id");
}
