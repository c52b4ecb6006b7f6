/**
 * The finished surface: every page of the authorization matrix, as every role that may open it, at
 * 1440 px and at 390 px (a phone), must pass tests/e2e/support/surface-checks.ts: no sideways page
 * scroll, no grid header cut short, no form field labelled only with Greek symbols. Pages come from
 * the matrix (tests/e2e/support/authorization-matrix.ts), so a new page is visited as soon as it has
 * its row. Placeholders resolve on the demo trials (CRN-201, CRN-305) and, for meetings, on the
 * matrix's fixture trial.
 */
import { expect, test, type Browser, type BrowserContext } from "@playwright/test";
import { execFileSync } from "node:child_process";
import path from "node:path";
import { ACCOUNTS } from "./support/accounts";
import { AUTHORIZATION_MATRIX, ROLES, type MatrixRole } from "./support/authorization-matrix";
import { OUTSIDER } from "./support/matrix-fixture-data";
import { SURFACE_CHECKS } from "./support/surface-checks";

type TrialIds = Record<string, number | undefined>;
const ROOT = path.resolve(import.meta.dirname, "../..");
const WIDTHS = [
  { width: 1440, height: 900 },
  { width: 390, height: 844 },
];

const fixtureOut = execFileSync("npx", ["tsx", "--conditions=react-server", "tests/e2e/support/matrix-fixture.ts"], {
  cwd: ROOT,
  env: { ...process.env, CAIRN_DB_NAME: process.env.CAIRN_E2E_DB ?? "cairn_e2e" },
  encoding: "utf8",
});
const ids = JSON.parse(fixtureOut.trim().split("\n").pop()!) as Record<"single" | "two" | "fixture", TrialIds>;

function fill(template: string, t: TrialIds): string | undefined {
  let unresolved = false;
  const out = template.replace(/\{(\w+)\}/g, (_, k: string) => {
    const v = t[k];
    if (v === undefined) unresolved = true;
    return String(v);
  });
  return unresolved ? undefined : out;
}

/** The pages a role may open (expected 200 in the matrix), each placeholder resolved once per trial that has it. */
function pagesFor(role: MatrixRole): string[] {
  const out = new Set<string>();
  for (const row of AUTHORIZATION_MATRIX) {
    if (row.kind !== "page" || row.pending || row.expect[role] !== 200) continue;
    if (!row.path.includes("{")) {
      out.add(row.path);
      continue;
    }
    // Meetings exist only on the fixture trial; the rest are seen on both demo trials.
    const trials = row.path.includes("{meeting}") ? [ids.fixture] : [ids.single, ids.two];
    for (const t of trials) {
      const url = fill(row.path, t);
      if (url) out.add(url);
    }
  }
  return [...out];
}

async function contextFor(browser: Browser, baseURL: string, role: MatrixRole): Promise<BrowserContext> {
  const ctx = await browser.newContext({ baseURL, viewport: WIDTHS[0] });
  if (role === "anonymous") return ctx;
  const who = role === "outsider" ? OUTSIDER : ACCOUNTS[role];
  const { csrfToken } = (await (await ctx.request.get("/api/auth/csrf")).json()) as { csrfToken: string };
  const res = await ctx.request.post("/api/auth/callback/credentials", { form: { email: who.email, password: who.password, csrfToken, json: "true", callbackUrl: "/trials" }, maxRedirects: 0 });
  const { url } = (await res.json()) as { url: string };
  expect(new URL(url, baseURL).searchParams.get("error"), `sign-in of ${who.email}`).toBeNull();
  return ctx;
}

for (const role of ROLES) {
  test(`every page ${role} may open reads well at 1440 and 390 px`, async ({ browser, baseURL }) => {
    const pages = pagesFor(role);
    test.setTimeout(120_000 + pages.length * 60_000);
    expect(pages.length).toBeGreaterThan(0);
    const ctx = await contextFor(browser, baseURL!, role);
    const page = await ctx.newPage();
    const problems: string[] = [];
    for (const url of pages) {
      await page.setViewportSize(WIDTHS[0]);
      const res = await page.goto(url, { waitUntil: "load" });
      expect(res?.status(), `${role} opens ${url}`).toBe(200);
      // Grids and charts are loaded after the page; give them the time a person would.
      await page.waitForLoadState("networkidle", { timeout: 20_000 }).catch(() => undefined);
      for (const size of WIDTHS) {
        await page.setViewportSize(size);
        // Two frames for layout (the grid measures its columns on resize).
        await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
        await page.waitForTimeout(300);
        for (const check of SURFACE_CHECKS) for (const p of await check.run(page)) problems.push(`${url} at ${size.width} px, ${check.name}: ${p}`);
      }
    }
    await ctx.close();
    expect(problems).toEqual([]);
  });
}
