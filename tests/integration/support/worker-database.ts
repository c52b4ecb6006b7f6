/**
 * Runs before every integration test file (vitest.integration.config.ts, setupFiles). The files run
 * in parallel workers, and each worker has a database of its own: worker 1 uses CAIRN_DB_NAME
 * (cairn_test), worker N uses cairn_test_N. scripts/test prepares them all; scripts/prepare-test-db
 * prepares one. Processes a test starts inherit the name through the environment.
 */
const base = process.env.CAIRN_DB_BASE_NAME ?? process.env.CAIRN_DB_NAME ?? "cairn_test";
process.env.CAIRN_DB_BASE_NAME = base;
const worker = Number(process.env.VITEST_POOL_ID ?? 1);
process.env.CAIRN_DB_NAME = worker > 1 ? `${base}_${worker}` : base;
