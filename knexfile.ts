import type { Knex } from "knex";
import { databaseConnection } from "./lib/config-shared";
import { migrationSource } from "./db/migrations";

// One configuration for every environment; the database name and account come from the environment
// (scripts/up uses `cairn`, scripts/test uses `cairn_test`).
const config: Knex.Config = {
  client: "mysql2",
  connection: databaseConnection(),
  pool: { min: 0, max: 10 },
  acquireConnectionTimeout: 10_000,
  migrations: { migrationSource, tableName: "knex_migrations" },
};

export default config;
