/**
 * Why: the audit trail. Append-only: the application's account has only SELECT and INSERT on it
 * (scripts/lib/common.sh), and triggers refuse UPDATE and DELETE for everyone. Each row's hash
 * chains to the previous row's, so an edit made behind the application's back shows.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("audit_events", (t) => {
    t.bigIncrements("id").primary();
    t.dateTime("occurred_at", { precision: 3 }).notNullable();
    t.integer("actor_user_id").unsigned().nullable();
    t.string("actor_email", 254).nullable();
    t.integer("trial_id").unsigned().nullable();
    t.string("action", 60).notNullable();
    t.string("entity_type", 40).notNullable();
    t.string("entity_id", 40).nullable();
    t.enu("visibility", ["open", "closed"]).notNullable();
    t.text("old_values", "longtext").nullable();
    t.text("new_values", "longtext").nullable();
    t.text("reason").nullable();
    t.string("prev_hash", 64).notNullable();
    t.string("hash", 64).notNullable();
    t.index(["trial_id", "occurred_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("audit_events");
}
