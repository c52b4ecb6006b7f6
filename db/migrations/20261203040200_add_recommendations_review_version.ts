/**
 * Why: a recommendation stays linked to the review version of its look it was made on. When the
 * look is reopened after review (analyses.review_version moves on), the recommendation is not
 * edited: it is superseded because its review_version is below the look's.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("recommendations", (t) => {
    t.integer("review_version").unsigned().notNullable().defaultTo(1);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("recommendations", (t) => {
    t.dropColumn("review_version");
  });
}
