/**
 * Why: sign-in throttling counts failed attempts per account and per client address over a
 * sliding window (lib/auth/rate-limit.ts). The counts must be the same whichever web process
 * answers (scripts/serve.mjs runs several) and must survive a restart, so they live here. Rows
 * older than the window are deleted as new ones arrive; the audit trail keeps the lasting record.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("sign_in_failures", (t) => {
    t.bigIncrements("id").primary();
    t.enu("scope", ["account", "address"]).notNullable();
    t.string("subject", 254).notNullable();
    t.dateTime("failed_at", { precision: 3 }).notNullable();
    t.index(["scope", "subject", "failed_at"]);
    t.index(["failed_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("sign_in_failures");
}
