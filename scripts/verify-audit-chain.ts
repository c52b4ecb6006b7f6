/**
 * Verifies the audit trail's hash chain: every row's hash covers its content and the previous
 * row's hash. Exits 0 when the chain is whole, 1 with the first broken row's id otherwise, 2 when
 * the check itself could not run (for example, the database is down).
 * Run with: npm run audit:verify   (tsx --conditions=react-server scripts/verify-audit-chain.ts)
 */
import { db } from "../db/knex";
import { verifyAuditChain } from "../db/audit";

try {
  const check = await verifyAuditChain(db);
  if (check.ok) {
    console.log(`audit chain verified: ${check.checked} rows, no break`);
  } else {
    console.error(`audit chain BROKEN at row id ${check.brokenAtId}: ${check.problem} (${check.checked} rows verified before it)`);
    process.exitCode = 1;
  }
} catch (e) {
  console.error(`audit chain could not be checked: ${e instanceof Error ? e.message : String(e)}`);
  process.exitCode = 2;
} finally {
  await db.destroy();
}
