/**
 * Why: the safety rule's denominator is the patients evaluable for toxicity (treated), a different
 * count from the patients evaluable for response. Null exactly when toxicities are not recorded
 * (a design without a safety rule). Rows stored before this column existed counted toxicities
 * among all enrolled patients, so they are backfilled with treated = enrolled, which keeps what was
 * locked meaning what it meant when it was signed.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasColumn("analysis_arm_counts", "treated")))
    await knex.schema.alterTable("analysis_arm_counts", (t) => {
      t.integer("treated").unsigned().nullable().after("enrolled");
    });
  await knex("analysis_arm_counts").whereNotNull("toxicities").whereNull("treated").update({ treated: knex.ref("enrolled") });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("analysis_arm_counts", (t) => {
    t.dropColumn("treated");
  });
}
