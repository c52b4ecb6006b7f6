/** Why: one row holding the last audit hash; updating it row-locks, which serialises appends to the chain. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("audit_chain_head", (t) => {
    t.integer("id").unsigned().primary();
    t.bigInteger("last_event_id").unsigned().notNullable().defaultTo(0);
    t.string("last_hash", 64).notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("audit_chain_head");
}
