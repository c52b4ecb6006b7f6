import "server-only";
import knexFactory, { type Knex } from "knex";
import knexConfig from "../knexfile";
import { isDatabaseDown, writeNotSaved } from "@/lib/http";

// One pool per process; cached on globalThis so dev-mode hot reload does not leak pools.
const globalForKnex = globalThis as unknown as { cairnKnex?: Knex };

export const db: Knex = globalForKnex.cairnKnex ?? knexFactory(knexConfig);
if (process.env.NODE_ENV !== "production") globalForKnex.cairnKnex = db;

export type Tx = Knex | Knex.Transaction;

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
    throw writeNotSaved();
  }
}
