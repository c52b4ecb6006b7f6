import { defineConfig } from "vitest/config";
import path from "node:path";

// Unit tests live beside the code they test (*.test.ts). No database, no network.
export default defineConfig({
  resolve: { alias: { "@": path.resolve(import.meta.dirname), "server-only": path.resolve(import.meta.dirname, "tests/integration/support/server-only-stub.ts") } },
  test: {
    include: ["lib/**/*.test.ts", "app/**/*.test.ts", "components/**/*.test.ts", "components/**/*.test.tsx", "db/**/*.unit.test.ts", "tests/matrix/**/*.test.ts", "tests/architecture/**/*.test.ts"],
    environment: "node",
    testTimeout: 60_000,
  },
});
