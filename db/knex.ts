import "server-only";
import knexFactory, { type Knex } from "knex";
import knexConfig from "../knexfile";

// One pool per process; cached on globalThis so dev-mode hot reload does not leak pools.
const globalForKnex = globalThis as unknown as { cairnKnex?: Knex };

export const db: Knex = globalForKnex.cairnKnex ?? knexFactory(knexConfig);
if (process.env.NODE_ENV !== "production") globalForKnex.cairnKnex = db;

export type Tx = Knex | Knex.Transaction;
