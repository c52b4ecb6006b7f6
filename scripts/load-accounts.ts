/**
 * Reviewer accounts for the load test (scripts/load-test.ts --users N): N invented DMC members on the
 * first demo trial (CRN-201), "load-reviewer-01@cairn.example" onwards, all with the password
 * printed below. Made once and reused; each creation and role is audited like any other.
 *   scripts/with-env npx tsx --conditions=react-server scripts/load-accounts.ts N
 * Prints the accounts as one line of JSON. For a demo or load-test database only.
 */
import bcrypt from "bcryptjs";
import { z } from "zod";
import { db } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import { fetchUserByEmail, insertUser } from "@/db/queries/users";
import { fetchMemberships, insertMembership } from "@/db/queries/memberships";

const LOAD_PASSWORD = "load-reviewer-pass";
const count = z.coerce.number().int().min(1).max(500).parse(process.argv[2] ?? "50");

async function main() {
  const trial = await db("trials").where({ code: "CRN-201" }).first();
  if (!trial) throw new Error("the demo trial CRN-201 is missing: run scripts/up (it seeds the demo) first");
  const hash = await bcrypt.hash(LOAD_PASSWORD, 10);
  const accounts: string[] = [];
  for (let i = 1; i <= count; i++) {
    const email = `load-reviewer-${String(i).padStart(2, "0")}@cairn.example`;
    accounts.push(email);
    await db.transaction(async (tx) => {
      let user = await fetchUserByEmail(email, tx);
      if (!user) {
        const id = await insertUser(tx, { email, name: `Load reviewer ${i}`, passwordHash: hash, isAdmin: false });
        await appendAudit(tx, { actorUserId: null, actorEmail: "load-accounts", trialId: null, action: "account_created", entityType: "user", entityId: id, visibility: "open", newValues: { email, isAdmin: false } });
        user = await fetchUserByEmail(email, tx);
      }
      const held = await fetchMemberships({ trialId: trial.id }, tx);
      if (!held.some((m) => m.userId === user!.id && m.role === "dmc_member")) {
        const mid = await insertMembership(tx, { trialId: trial.id, userId: user!.id, role: "dmc_member" });
        await appendAudit(tx, { actorUserId: null, actorEmail: "load-accounts", trialId: trial.id, action: "role_assigned", entityType: "trial_membership", entityId: mid, visibility: "open", newValues: { userId: user!.id, role: "dmc_member" } });
      }
    });
  }
  console.log(JSON.stringify({ trialId: trial.id, password: LOAD_PASSWORD, accounts }));
}

main()
  .then(() => db.destroy())
  .catch(async (e) => {
    console.error(e);
    await db.destroy();
    process.exit(1);
  });
