/**
 * Why: a DMC meeting of a trial, reviewing one analysis. The time is stored in UTC with the IANA
 * time zone it was scheduled in, so it is shown to attendees as the organiser meant it (and stays
 * right across clock changes). The agendas are text typed by the organiser, not trial data.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("meetings", (t) => {
    t.increments("id").primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("analysis_id").unsigned().notNullable().references("analyses.id");
    t.dateTime("scheduled_at", { precision: 3 }).notNullable();
    t.string("time_zone", 64).notNullable();
    t.text("open_agenda").notNullable();
    t.text("closed_agenda").notNullable();
    t.integer("reminder_days_before").unsigned().notNullable().defaultTo(3);
    t.dateTime("reminder_sent_at", { precision: 3 }).nullable();
    t.enu("status", ["scheduled", "held", "cancelled"]).notNullable().defaultTo("scheduled");
    t.integer("row_version").unsigned().notNullable().defaultTo(1);
    t.integer("created_by").unsigned().nullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(["trial_id", "scheduled_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("meetings");
}
