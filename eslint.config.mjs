import { defineConfig, globalIgnores } from "eslint/config";
import nextVitals from "eslint-config-next/core-web-vitals";
import nextTs from "eslint-config-next/typescript";

// The framework's own configuration (Core Web Vitals and TypeScript), as Next's documentation sets it up.
export default defineConfig([
  ...nextVitals,
  ...nextTs,
  globalIgnores([".next/**", ".next-*/**", "out/**", "build/**", "next-env.d.ts", ".workers/**", ".data/**", ".run/**", "test-results/**", "playwright-report/**", "coverage/**", "public/**"]),
]);
