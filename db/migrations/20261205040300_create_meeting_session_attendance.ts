/**
 * Why: a DMC meeting has an open session (committee, sponsor, coordinator, statistician) and a
 * closed session (committee and unblinded statistician only); who attended each is recorded
 * separately, because the quorum is counted in the closed session.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("meeting_session_attendance", (t) => {
    t.increments("id").primary();
    t.integer("meeting_id").unsigned().notNullable().references("meetings.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.enu("session", ["open", "closed"]).notNullable();
    t.boolean("attended").notNullable();
    t.integer("recorded_by").unsigned().nullable().references("users.id");
    t.dateTime("recorded_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["meeting_id", "user_id", "session"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("meeting_session_attendance");
}
