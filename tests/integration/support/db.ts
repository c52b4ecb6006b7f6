/**
 * Test database helpers. The tests run as the application's account (like the app) through
 * db/knex; resetting the schema needs the owner account, which may drop tables.
 */
import knexFactory, { type Knex } from "knex";
import bcrypt from "bcryptjs";
import config from "@/knexfile";
import { databaseConnection } from "@/lib/config-shared";
import { db } from "@/db/knex";
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

export { db };
