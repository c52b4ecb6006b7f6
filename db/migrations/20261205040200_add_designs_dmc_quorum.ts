/**
 * Why: the quorum of the DMC (voting members present in the closed session) belongs to the charter,
 * so it is written in the design version that is locked as the charter version. Null on designs
 * written before: the committee then needs a majority of its voting members.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("designs", (t) => {
    t.integer("dmc_quorum").unsigned().nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("designs", (t) => {
    t.dropColumn("dmc_quorum");
  });
}
