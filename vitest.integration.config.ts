import { defineConfig } from "vitest/config";
import path from "node:path";

// Integration tests run against the real MariaDB test database (CAIRN_DB_NAME=cairn_test), one
// file at a time because they share that database. scripts/test starts MariaDB and migrates first.
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
    fileParallelism: false,
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
