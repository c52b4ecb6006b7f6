/**
 * Test database helpers. The tests run as the application's account (like the app) through
 * db/knex; resetting the schema needs the owner account, which may drop tables.
 */
import { createHash } from "node:crypto";
import { existsSync, readdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import knexFactory, { type Knex } from "knex";
import bcrypt from "bcryptjs";
import config from "@/knexfile";
import { databaseConnection } from "@/lib/config-shared";
import { db } from "@/db/knex";
import { GENESIS_HASH } from "@/db/audit";
import { insertUser } from "@/db/queries/users";
import { insertTrial } from "@/db/queries/trials";
import { insertMembership } from "@/db/queries/memberships";
import type { PublicUser, TrialRole } from "@/db/types";

export function ownerKnex(pool?: Knex.PoolConfig): Knex {
  return knexFactory({ ...config, connection: databaseConnection(true), ...(pool ? { pool } : {}) });
}

if (!process.env.CAIRN_DB_NAME?.startsWith("cairn_test")) {
  throw new Error("Integration tests must run against CAIRN_DB_NAME=cairn_test (use scripts/test).");
}

/**
 * A fingerprint of the schema as the database reports it: every column, index, constraint, trigger,
 * view and routine. Two databases with the same fingerprint have the same schema, whatever their data.
 */
async function schemaFingerprint(owner: Knex): Promise<string> {
  const queries = [
    "SELECT TABLE_NAME, COLUMN_NAME, ORDINAL_POSITION, COLUMN_TYPE, IS_NULLABLE, COLUMN_DEFAULT, EXTRA, COLLATION_NAME, GENERATION_EXPRESSION FROM information_schema.COLUMNS WHERE TABLE_SCHEMA = DATABASE() ORDER BY TABLE_NAME, ORDINAL_POSITION",
    "SELECT TABLE_NAME, INDEX_NAME, SEQ_IN_INDEX, COLUMN_NAME, NON_UNIQUE FROM information_schema.STATISTICS WHERE TABLE_SCHEMA = DATABASE() ORDER BY TABLE_NAME, INDEX_NAME, SEQ_IN_INDEX",
    "SELECT TABLE_NAME, CONSTRAINT_NAME, CONSTRAINT_TYPE FROM information_schema.TABLE_CONSTRAINTS WHERE CONSTRAINT_SCHEMA = DATABASE() ORDER BY TABLE_NAME, CONSTRAINT_NAME",
    "SELECT TABLE_NAME, CONSTRAINT_NAME, CHECK_CLAUSE FROM information_schema.CHECK_CONSTRAINTS WHERE CONSTRAINT_SCHEMA = DATABASE() ORDER BY TABLE_NAME, CONSTRAINT_NAME",
    "SELECT TABLE_NAME, CONSTRAINT_NAME, REFERENCED_TABLE_NAME, UPDATE_RULE, DELETE_RULE FROM information_schema.REFERENTIAL_CONSTRAINTS WHERE CONSTRAINT_SCHEMA = DATABASE() ORDER BY TABLE_NAME, CONSTRAINT_NAME",
    "SELECT TRIGGER_NAME, EVENT_MANIPULATION, EVENT_OBJECT_TABLE, ACTION_TIMING, ACTION_STATEMENT FROM information_schema.TRIGGERS WHERE TRIGGER_SCHEMA = DATABASE() ORDER BY TRIGGER_NAME",
    "SELECT TABLE_NAME, VIEW_DEFINITION FROM information_schema.VIEWS WHERE TABLE_SCHEMA = DATABASE() ORDER BY TABLE_NAME",
    "SELECT ROUTINE_NAME, ROUTINE_TYPE, ROUTINE_DEFINITION FROM information_schema.ROUTINES WHERE ROUTINE_SCHEMA = DATABASE() ORDER BY ROUTINE_NAME",
  ];
  // View definitions name their database: left out, so every test database has the same fingerprint.
  const [[{ name }]] = (await owner.raw("SELECT DATABASE() AS name")) as [[{ name: string }]];
  const hash = createHash("sha256");
  for (const q of queries) hash.update(JSON.stringify((await owner.raw(q))[0]).split(`\`${name}\``).join("`{database}`")).update("\n");
  return hash.digest("hex");
}

/**
 * Where the fingerprint of a freshly migrated schema is kept between test files and workers: one
 * file per set of migration files (their names and contents), so a changed migration never meets a
 * stale fingerprint. It is written only right after a full migration.
 */
function fingerprintFile(): string {
  const dir = path.join(import.meta.dirname, "../../../db/migrations");
  const hash = createHash("sha256");
  for (const f of readdirSync(dir).sort()) hash.update(f).update(readFileSync(path.join(dir, f)));
  return path.join(os.tmpdir(), `cairn-test-schema-${hash.digest("hex").slice(0, 16)}.txt`);
}

/**
 * A clean, empty schema at the latest migration. When the schema is already exactly the freshly
 * migrated one (no pending migration, the same fingerprint), every table is emptied (TRUNCATE, which
 * also restarts the ids at 1), in well under a second. Otherwise (a test went down the migrations,
 * or dropped a trigger) everything is dropped and the migrations run from the first, which takes
 * seconds. (Running the down migrations instead would take as long again; tests/integration/migrations.test.ts
 * tests them.)
 */
export async function resetDatabase(): Promise<void> {
  // One connection, so the foreign-key switch holds for every statement after it.
  const owner = ownerKnex({ min: 1, max: 1 });
  const file = fingerprintFile();
  try {
    const [, pending] = (await owner.migrate.list()) as [unknown[], unknown[]];
    const known = existsSync(file) ? readFileSync(file, "utf8") : null;
    const [objects] = (await owner.raw("SELECT TABLE_NAME AS name, TABLE_TYPE AS type FROM information_schema.TABLES WHERE TABLE_SCHEMA = DATABASE()")) as [Array<{ name: string; type: string }>];
    const tables = objects.filter((o) => o.type === "BASE TABLE");
    await owner.raw("SET FOREIGN_KEY_CHECKS = 0");
    if (known && pending.length === 0 && (await schemaFingerprint(owner)) === known) {
      for (const { name } of tables) if (!name.startsWith("knex_migrations")) await owner.raw("TRUNCATE TABLE ??", [name]);
      return;
    }
    for (const { name } of objects.filter((o) => o.type === "VIEW")) await owner.raw("DROP VIEW ??", [name]);
    for (const { name } of tables) await owner.raw("DROP TABLE ??", [name]);
    const [routines] = (await owner.raw("SELECT ROUTINE_NAME AS name, ROUTINE_TYPE AS type FROM information_schema.ROUTINES WHERE ROUTINE_SCHEMA = DATABASE()")) as [Array<{ name: string; type: string }>];
    for (const { name, type } of routines) await owner.raw(`DROP ${type === "FUNCTION" ? "FUNCTION" : "PROCEDURE"} ??`, [name]);
  } finally {
    await owner.destroy();
  }
  const migrator = ownerKnex();
  try {
    await migrator.migrate.latest();
    const fresh = await schemaFingerprint(migrator);
    // Written whole, then renamed: a parallel reader never sees half a fingerprint.
    const tmp = `${file}.${process.pid}`;
    writeFileSync(tmp, fresh);
    renameSync(tmp, file);
  } finally {
    await migrator.destroy();
  }
}

let counter = 0;
/** Typed factory: a user with a known password (bcrypt cost 4 to keep tests quick). */
export async function makeUser(opts: { isAdmin?: boolean; name?: string } = {}): Promise<PublicUser & { password: string }> {
  counter++;
  const email = `user${counter}-${Date.now()}@test.example`;
  const password = `password-${counter}-long`;
  const id = await db.transaction((tx) => insertUser(tx, { email, name: opts.name ?? `Test user ${counter}`, passwordHash: bcrypt.hashSync(password, 4), isAdmin: !!opts.isAdmin }));
  return { id, email, name: opts.name ?? `Test user ${counter}`, isAdmin: !!opts.isAdmin, isActive: true, password };
}

export async function makeTrial(opts: { designType?: "single" | "two"; code?: string } = {}): Promise<number> {
  counter++;
  const designType = opts.designType ?? "single";
  return db.transaction((tx) =>
    insertTrial(tx, {
      code: opts.code ?? `T-${counter}-${Date.now() % 100000}`,
      title: `Test trial ${counter}`,
      sponsorName: "Test sponsor (invented)",
      phase: "II",
      designType,
      endpointName: "Response",
      toxicityEndpointName: null,
      targetEnrolment: 40,
      createdBy: null,
      arms: designType === "single" ? [{ label: "Arm A", armRole: "single" }] : [{ label: "Arm E", armRole: "experimental" }, { label: "Arm C", armRole: "control" }],
    }),
  );
}

export async function giveRole(userId: number, trialId: number, role: TrialRole): Promise<void> {
  await db.transaction((tx) => insertMembership(tx, { userId, trialId, role }));
}

/**
 * Kills a write in the middle of its transaction. The owner account holds the audit chain head,
 * so the write does its work and then waits inside its transaction at appendAudit, a known point
 * in its middle; `midway` runs there (with the owner's connection, e.g. to peek at uncommitted
 * rows), then the write's connection is killed. Resolves with what the write threw, or null.
 */
export async function killMidTransaction(write: () => Promise<unknown>, midway: (owner: Knex) => Promise<void> = async () => {}): Promise<unknown> {
  const owner = ownerKnex();
  // The chain head row must exist for the lock to hold a row (before the first audited write it does not).
  await owner.raw("INSERT IGNORE INTO audit_chain_head (id, last_event_id, last_hash) VALUES (1, 0, ?)", [GENESIS_HASH]);
  const hold = await owner.transaction();
  try {
    await hold("audit_chain_head").where({ id: 1 }).forUpdate();
    const outcome = write().then(
      () => null,
      (e: unknown) => e,
    );
    // Find the blocked connection (the same account may see and kill its own threads).
    let victim: number | undefined;
    for (let i = 0; i < 200 && victim === undefined; i++) {
      const [procs] = await db.raw("SELECT ID FROM information_schema.PROCESSLIST WHERE INFO LIKE '%audit_chain_head%for update%' AND DB = DATABASE() AND ID <> CONNECTION_ID()");
      victim = (procs as Array<{ ID: number }>)[0]?.ID;
      if (victim === undefined) await new Promise((r) => setTimeout(r, 50));
    }
    if (victim === undefined) throw new Error("the write never reached its audit row, so it was not stopped midway");
    await midway(owner);
    await db.raw(`KILL ${Number(victim)}`);
    return await outcome;
  } finally {
    await hold.rollback().catch(() => undefined);
    await owner.destroy();
  }
}

export { db };
