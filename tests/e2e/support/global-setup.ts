/**
 * Runs once before any browser test: makes the authorization matrix's fixture (matrix-fixture.ts)
 * straight in the test database, as the seed is made, and hands its ids to the workers through the
 * environment (support/matrix-ids.ts). Once per run, so specs running side by side share one fixture.
 * When the environment already holds the ids (scripts/test makes the fixture during the build), nothing
 * is made here.
 */
import { execFileSync } from "node:child_process";
import path from "node:path";
import { MATRIX_IDS_ENV } from "./matrix-ids";

export default function globalSetup() {
  // scripts/test makes it while the build runs and passes the ids on.
  if (process.env[MATRIX_IDS_ENV]) return;
  const out = execFileSync("npx", ["tsx", "--conditions=react-server", "tests/e2e/support/matrix-fixture.ts"], {
    cwd: path.resolve(import.meta.dirname, "../../.."),
    env: { ...process.env, CAIRN_DB_NAME: process.env.CAIRN_E2E_DB ?? "cairn_e2e" },
    encoding: "utf8",
  });
  process.env[MATRIX_IDS_ENV] = out.trim().split("\n").pop()!;
}
