import "server-only";
import knexFactory, { type Knex } from "knex";
import knexConfig from "../knexfile";
import { blindedDatabaseConnection } from "../lib/config-shared";
import { isDatabaseDown, WriteNotSavedError } from "./errors";

// One pool per account per process; cached on globalThis so dev-mode hot reload does not leak pools.
const globalForKnex = globalThis as unknown as { cairnKnex?: Knex; cairnBlindKnex?: Knex };

/** The application's account: all writes, and reads for unblinded roles. */
export const db: Knex = globalForKnex.cairnKnex ?? knexFactory(knexConfig);
if (process.env.NODE_ENV !== "production") globalForKnex.cairnKnex = db;

/**
 * The blinded account: reads for blinded roles (sponsor, coordinator, administrator without an
 * unblinded role). It has SELECT on open tables, open columns and the *_open views only, so a
 * query made for a blinded request that names closed data is refused by MariaDB.
 */
export const blindDb: Knex =
  globalForKnex.cairnBlindKnex ?? knexFactory({ ...knexConfig, connection: blindedDatabaseConnection(), pool: { min: 0, max: 6 }, migrations: undefined });
if (process.env.NODE_ENV !== "production") globalForKnex.cairnBlindKnex = blindDb;

export type Tx = Knex | Knex.Transaction;

declare const closedBrand: unique symbol;
/**
 * A connection allowed to read closed data. Closed query functions (db/queries/closed.ts) take
 * one (or a write transaction) and no default, so a blinded request has nothing to call them with:
 * lib/auth hands one out only with an unblinded TrialAccess (closedConnection()). The brand exists
 * only for the type checker; a static test checks who calls asClosedConnection.
 */
export type ClosedConnection = Knex & { readonly [closedBrand]: "closed" };
/** What closed reads accept: the branded connection, or a write transaction opened by a service that checked the role. */
export type ClosedReader = ClosedConnection | Knex.Transaction;

/** Only lib/auth (for an unblinded access) may call this (tests and the seed fixtures aside); see tests/integration/blinding-database.test.ts. */
export function asClosedConnection(k: Knex = db): ClosedConnection {
  return k as ClosedConnection;
}

/**
 * Every multi-row write runs here: all of it commits or none of it does, and a connection lost
 * midway (server restart, killed session) surfaces as a 503 that says nothing was saved, which
 * route handlers and server actions show as a message (MariaDB rolls back what was not committed).
 */
export async function writeTransaction<T>(fn: (tx: Knex.Transaction) => Promise<T>): Promise<T> {
  try {
    return await db.transaction(fn);
  } catch (e) {
    if (!isDatabaseDown(e)) throw e;
    console.error("[cairn] database connection lost during a write", e);
    throw new WriteNotSavedError();
  }
}
