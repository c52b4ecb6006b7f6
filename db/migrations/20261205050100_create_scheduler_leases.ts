/**
 * Why: every web process runs the mail scheduler (due reminders, mail retries), but only one of them
 * should send at a time. The processes share nothing but MariaDB, so the sender is chosen here: one
 * row per scheduled duty naming its holder until a time; another process takes the duty over only
 * after that time has passed (a holder that died stops renewing). Operational state, no trial record.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("scheduler_leases", (t) => {
    t.string("name", 64).primary();
    t.string("holder", 128).notNullable();
    t.dateTime("expires_at", { precision: 3 }).notNullable();
    t.dateTime("renewed_at", { precision: 3 }).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("scheduler_leases");
}
