/**
 * Why: a reviewed look can be reopened for a correction. Each review of the look is a version;
 * review_version is the one now in force (1 for the first review, +1 per reopening after review),
 * so recommendations made on an earlier version can be shown as superseded. Open information: the
 * number says that a correction happened, not what changed.
 */
import type { Knex } from "knex";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("analyses", (t) => {
    t.integer("review_version").unsigned().notNullable().defaultTo(1);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("analyses", (t) => {
    t.dropColumn("review_version");
  });
}
