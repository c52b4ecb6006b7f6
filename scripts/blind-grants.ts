/**
 * Prints the GRANT statements for the blinded database account, from db/classification.ts, for the
 * tables and views that exist in the database. Read by grant_blind_privileges (scripts/lib/common.sh)
 * from standard input: `npx tsx scripts/blind-grants.ts DB ACCOUNT < table-names`.
 */
import { readFileSync } from "node:fs";
import { BLINDED_READS, blindedGrantStatements } from "../db/classification";

const [dbName, account] = process.argv.slice(2);
if (!dbName || !account) {
  console.error("usage: blind-grants.ts DATABASE 'user'@'host' < table-names");
  process.exit(2);
}
const existing = readFileSync(0, "utf8").split(/\s+/).filter(Boolean);
const unclassified = existing.filter((t) => BLINDED_READS[t] === undefined);
// Deny by default: an unclassified table gets no grant; said loudly so it is classified.
for (const t of unclassified) console.error(`[cairn] table ${t} is not classified in db/classification.ts: the blinded account gets no access to it`);
console.log(blindedGrantStatements(dbName, account, existing).join("\n"));
