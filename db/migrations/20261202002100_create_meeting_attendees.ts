/**
 * Why: who is invited to a DMC meeting (members of the trial) and, once it is held, who attended.
 * `attended` is null until attendance is recorded, so "not yet recorded" differs from "absent".
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("meeting_attendees", (t) => {
    t.increments("id").primary();
    t.integer("meeting_id").unsigned().notNullable().references("meetings.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.boolean("attended").nullable();
    t.unique(["meeting_id", "user_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("meeting_attendees");
}
