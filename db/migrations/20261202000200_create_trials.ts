/** Why: a trial is the unit of access control; everything else hangs off it. */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("trials", (t) => {
    t.increments("id").primary();
    t.string("code", 40).notNullable().unique();
    t.string("title", 300).notNullable();
    t.string("sponsor_name", 200).notNullable();
    t.string("phase", 20).notNullable().defaultTo("II");
    t.enu("design_type", ["single", "two"]).notNullable();
    t.string("endpoint_name", 200).notNullable();
    t.string("toxicity_endpoint_name", 200).nullable();
    t.integer("target_enrolment").unsigned().notNullable();
    t.date("first_patient_on").nullable();
    t.enu("status", ["design", "active", "closed"]).notNullable().defaultTo("design");
    t.integer("created_by").unsigned().nullable().references("users.id");
    t.dateTime("created_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.dateTime("updated_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("trials");
}
