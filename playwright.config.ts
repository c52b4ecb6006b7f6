import { defineConfig } from "@playwright/test";

// Browser tests against the production build, in Debian's chromium (never a downloaded browser).
// scripts/test prepares the seeded database named by CAIRN_E2E_DB and runs `next build` first.
const port = Number(process.env.CAIRN_E2E_PORT ?? 3100);
const smtpPort = Number(process.env.CAIRN_E2E_SMTP_PORT ?? 2526);
const baseURL = `http://localhost:${port}`;
/**
 * Specs that only read, and hold their sign-ins long enough to need it: they may run beside anything,
 * and sign in again if a flow's sign-out ends their session (short read-only specs stay in the flows).
 */
const READS = ["page-sweep.spec.ts", "blinding-matrix.spec.ts"].map((f) => `**/${f}`);

export default defineConfig({
  testDir: "tests/e2e",
  // Per port, so parallel runs on one machine do not delete each other's traces.
  outputDir: `test-results/e2e-${port}`,
  // Made once before any test: the authorization matrix's fixture (its ids reach workers by environment).
  globalSetup: "./tests/e2e/support/global-setup.ts",
  // Two lanes side by side: the flows change the seeded data (and sign people out) and run one at a
  // time, in file order; the reads (every page and route as every role, nothing changed) run beside
  // them and spread over whatever worker is free (docs: DEVELOPERS.md, "Browser tests").
  // Three workers: the flows hold one, the reads two. The browser tests wait on the server and on the page far
  // more than they compute (about one core busy on average over a run), so a third worker shortens
  // the run on two cores.
  workers: Number(process.env.CAIRN_E2E_WORKERS ?? 3),
  projects: [
    // Flows first: the scheduler hands a free worker the first queued job whose project is under its
    // limit, so the flows' next file is always taken at once and the reads fill the other workers.
    { name: "flows", testIgnore: READS, fullyParallel: false, workers: 1 },
    { name: "reads", testMatch: READS, fullyParallel: true },
  ],
  retries: 0,
  // Bounds on a hang, not latency checks: the suite runs on a shared two-core machine where one
  // server action can take tens of seconds under load. Assertions wait for what the page shows.
  timeout: 180_000,
  expect: { timeout: 30_000 },
  use: {
    baseURL,
    trace: "retain-on-failure",
    launchOptions: {
      executablePath: "/usr/bin/chromium",
      args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--disable-dev-shm-usage"],
    },
  },
  webServer: [
    {
      command: `npx tsx scripts/mail-catcher.ts --port ${smtpPort} --dir .data/mail-e2e-${port}`,
      port: smtpPort,
      reuseExistingServer: false,
      timeout: 30_000,
    },
    {
      // Two web processes, as scripts/up runs them, so every test also crosses processes.
      command: `node scripts/serve.mjs -p ${port} --workers 2`,
      url: `${baseURL}/api/health`,
      reuseExistingServer: false,
      timeout: 60_000,
      env: {
        ...(process.env as Record<string, string>),
        NODE_ENV: "production",
        CAIRN_DB_NAME: process.env.CAIRN_E2E_DB ?? "cairn_e2e",
        NEXTAUTH_URL: baseURL,
        SMTP_HOST: "127.0.0.1",
        SMTP_PORT: String(smtpPort),
        CAIRN_MAIL_DIR: `.data/mail-e2e-${port}`,
        // The tests play the part of one reverse proxy by setting X-Forwarded-For, to sign in from
        // several addresses (tests/e2e/security.spec.ts); without this the header is ignored.
        CAIRN_TRUSTED_PROXY: "1",
      },
    },
  ],
});
