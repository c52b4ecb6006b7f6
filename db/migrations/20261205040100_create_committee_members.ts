/**
 * Why: a trial's data monitoring committee as its charter sets it up: voting members, one chair
 * (who also votes) and the independent statistician, who attends but does not vote.
 * `chair_of_trial_id` holds the trial id on the chair's row only; its unique index makes a second
 * chair of one trial impossible even if two administrators act at once.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("committee_members", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.enu("member_role", ["chair", "voting", "statistician"]).notNullable();
    t.integer("chair_of_trial_id").unsigned().nullable().unique();
    t.integer("row_version").unsigned().notNullable().defaultTo(1);
    t.integer("created_by").unsigned().nullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(["trial_id", "user_id"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("committee_members");
}
