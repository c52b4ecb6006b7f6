/**
 * Why: a calibration search runs for minutes in whichever web process received it, while the
 * page polls its progress and may cancel it through any process (scripts/serve.mjs runs several).
 * The row is the job's shared state: the running process writes progress, the best designs so far
 * and a heartbeat after every chunk, and reads the cancel request back. A row whose heartbeat has
 * stopped belongs to a process that ended; readers report it as failed.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("calibration_jobs", (t) => {
    t.string("id", 36).primary();
    t.integer("trial_id").unsigned().notNullable().references("trials.id").onDelete("CASCADE");
    t.integer("user_id").unsigned().notNullable().references("users.id");
    t.enu("status", ["running", "done", "cancelled", "failed"]).notNullable().defaultTo("running");
    t.double("progress").notNullable().defaultTo(0);
    t.integer("total").unsigned().notNullable();
    t.integer("evaluated").unsigned().notNullable().defaultTo(0);
    t.integer("feasible").unsigned().notNullable().defaultTo(0);
    t.text("best_json", "mediumtext").notNullable();
    t.string("error", 500).nullable();
    t.boolean("cancel_requested").notNullable().defaultTo(false);
    t.dateTime("started_at", { precision: 3 }).notNullable();
    t.dateTime("heartbeat_at", { precision: 3 }).notNullable();
    t.dateTime("finished_at", { precision: 3 }).nullable();
    // Admission counts live running jobs; pruning deletes by last touch.
    t.index(["status", "heartbeat_at"]);
    t.index(["heartbeat_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("calibration_jobs");
}
