/** Runs the knex migrations to the latest (or, with "rollback-all", all the way down). */
import knexFactory from "knex";
import config from "../knexfile";

const knex = knexFactory(config);
const direction = process.argv[2] ?? "latest";
try {
  if (direction === "rollback-all") {
    await knex.migrate.rollback(undefined, true);
  } else {
    const [, applied] = await knex.migrate.latest();
    if (applied.length) console.log(`applied ${applied.length} migration(s)`);
  }
} finally {
  await knex.destroy();
}
