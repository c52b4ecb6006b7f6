/**
 * Why: patients enrolled by the cut-off whose response is not yet known (pending outcomes) are part
 * of the future in the predictive probability, and the review shows responders / evaluable /
 * pending per arm. Closed like every arm-level count (analysis_arm_counts is unreadable to the
 * blinded account). Rows stored before had no such count: 0 keeps what was locked meaning what it meant.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasColumn("analysis_arm_counts", "pending")))
    await knex.schema.alterTable("analysis_arm_counts", (t) => {
      t.integer("pending").unsigned().notNullable().defaultTo(0).after("evaluable");
    });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("analysis_arm_counts", (t) => {
    t.dropColumn("pending");
  });
}
