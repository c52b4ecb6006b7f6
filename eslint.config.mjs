import { defineConfig, globalIgnores } from "eslint/config";
import nextVitals from "eslint-config-next/core-web-vitals";
import nextTs from "eslint-config-next/typescript";

// The framework's own configuration (Core Web Vitals and TypeScript), as Next's documentation sets it up.
export default defineConfig([
  ...nextVitals,
  ...nextTs,
  {
    rules: {
      // A leading underscore marks a value taken out on purpose (a destructured field left behind, an unused argument).
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_", caughtErrorsIgnorePattern: "^_", destructuredArrayIgnorePattern: "^_" }],
    },
  },
  {
    // Server components render once per request on the server: reading the clock there is the request's time,
    // not an impure re-render (the rule is written for client components).
    files: ["app/**/page.tsx", "app/**/layout.tsx"],
    rules: { "react-hooks/purity": "off" },
  },
  globalIgnores([".next/**", ".next-*/**", "out/**", "build/**", "next-env.d.ts", ".workers/**", ".data/**", ".run/**", "test-results/**", "playwright-report/**", "coverage/**", "public/**"]),
]);
