import { defineConfig } from "vitest/config";
import path from "node:path";

// Integration tests run against the real MariaDB, in parallel files: each worker has its own test
// database (support/worker-database.ts: cairn_test, cairn_test_2, ...), so the files never share
// rows. scripts/test starts MariaDB and migrates one database per worker first.
const workers = Number(process.env.CAIRN_INTEGRATION_WORKERS ?? 2);
export default defineConfig({
  resolve: {
    alias: {
      "@": path.resolve(import.meta.dirname),
      // The server-only guard throws outside a React Server environment; tests are server code.
      "server-only": path.resolve(import.meta.dirname, "tests/integration/support/server-only-stub.ts"),
    },
  },
  test: {
    include: ["tests/integration/**/*.test.ts"],
    environment: "node",
    setupFiles: ["tests/integration/support/worker-database.ts"],
    maxWorkers: workers,
    fileParallelism: workers > 1,
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
