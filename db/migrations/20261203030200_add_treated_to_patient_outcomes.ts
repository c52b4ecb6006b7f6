/**
 * Why: a patient-level look derives its toxicity denominator from its patient rows, so each row
 * says whether the patient was treated (evaluable for toxicity). Null when the design records no
 * toxicity. Rows uploaded before this column existed were all counted as treated (every enrolled
 * patient), so those with a toxicity outcome are backfilled as treated.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasColumn("patient_outcomes", "treated")))
    await knex.schema.alterTable("patient_outcomes", (t) => {
      t.boolean("treated").nullable().after("responder");
    });
  await knex("patient_outcomes").whereNotNull("toxicity").whereNull("treated").update({ treated: true });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("patient_outcomes", (t) => {
    t.dropColumn("treated");
  });
}
