/**
 * Test database helpers. The tests run as the application's account (like the app) through
 * db/knex; resetting the schema needs the owner account, which may drop tables.
 */
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

export function ownerKnex(): Knex {
  return knexFactory({ ...config, connection: databaseConnection(true) });
}

if (!process.env.CAIRN_DB_NAME?.startsWith("cairn_test")) {
  throw new Error("Integration tests must run against CAIRN_DB_NAME=cairn_test (use scripts/test).");
}

/** Drops every table and migrates again: a clean, empty schema. */
export async function resetDatabase(): Promise<void> {
  const owner = ownerKnex();
  try {
    await owner.migrate.rollback(undefined, true);
    await owner.migrate.latest();
  } finally {
    await owner.destroy();
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
      const [procs] = await db.raw("SELECT ID FROM information_schema.PROCESSLIST WHERE INFO LIKE '%audit_chain_head%for update%' AND ID <> CONNECTION_ID()");
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
