/**
 * Why: a patient row of the CSV may say its response is pending (evaluable column "pending": will be
 * evaluable, outcome not yet known at the cut-off). Stored so the patient grid and the derived
 * pending count agree with the file. Closed (patient_outcomes is unreadable to the blinded account).
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasColumn("patient_outcomes", "outcome_pending")))
    await knex.schema.alterTable("patient_outcomes", (t) => {
      t.boolean("outcome_pending").notNullable().defaultTo(false).after("evaluable");
    });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("patient_outcomes", (t) => {
    t.dropColumn("outcome_pending");
  });
}
