// Adds up the JSON reports of vitest and Playwright into one closing line: "N passed, N failed".
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";

const dir = process.argv[2];
let passed = 0, failed = 0, skipped = 0;
for (const f of readdirSync(dir).filter((f) => f.endsWith(".json"))) {
  const r = JSON.parse(readFileSync(path.join(dir, f), "utf8"));
  if (typeof r.numPassedTests === "number") {
    // vitest
    passed += r.numPassedTests;
    failed += r.numFailedTests;
    skipped += (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
    // A suite that fails to load has no failed tests of its own; count it so it cannot pass silently.
    if (r.numFailedTestSuites && r.numFailedTests === 0) failed += r.numFailedTestSuites;
  } else if (r.stats) {
    // Playwright
    passed += r.stats.expected ?? 0;
    failed += (r.stats.unexpected ?? 0) + (r.stats.flaky ?? 0);
    skipped += r.stats.skipped ?? 0;
  }
}
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(failed > 0 || passed === 0 ? 1 : 0);
