/** Runs the knex migrations to the latest (or, with "rollback-all", all the way down), then checks no applied migration was edited. */
import knexFactory from "knex";
import config from "../knexfile";
import { CHECKSUM_TABLE, recordAndVerifyChecksums } from "../db/migration-checksums";

const knex = knexFactory(config);
const direction = process.argv[2] ?? "latest";
try {
  if (direction === "rollback-all") {
    await knex.migrate.rollback(undefined, true);
    if (await knex.schema.hasTable(CHECKSUM_TABLE)) await knex(CHECKSUM_TABLE).delete();
  } else {
    // Before migrating too: an edited applied migration is reported even when nothing new is applied.
    if (await knex.schema.hasTable("knex_migrations")) await recordAndVerifyChecksums(knex);
    const [, applied] = await knex.migrate.latest();
    if (applied.length) console.log(`applied ${applied.length} migration(s)`);
    await recordAndVerifyChecksums(knex);
  }
} catch (e) {
  console.error(e instanceof Error ? e.message : e);
  process.exitCode = 1;
} finally {
  await knex.destroy();
}
