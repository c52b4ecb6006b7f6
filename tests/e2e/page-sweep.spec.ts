/**
 * One visit per page, role and width, and every page-level check on it. Every page of the
 * authorization matrix (tests/e2e/support/authorization-matrix.ts) is opened as every role that may
 * open it (the rows whose cell is 200), on both demo trials (CRN-201, single arm; CRN-305, two arms)
 * and, for meeting pages, on the matrix's fixture trial (support/matrix-fixture.ts, made once by
 * support/global-setup.ts). On each page:
 *  - at 1440 px: axe-core (@axe-core/playwright) with the WCAG 2.0, 2.1 and 2.2 A and AA tags finds no
 *    serious or critical violation; every chart drawn has a visible title, a text summary, a numbers
 *    table, a drawing hidden from assistive technology and no chart toolbar
 *    (components/charts/chart-figure.tsx); the surface checks (support/surface-checks.ts) pass;
 *  - at 390 px (a phone): the surface checks pass again (no sideways page scroll, no grid header cut
 *    short, no Greek-only field label);
 *  - at 320 px: the page reflows without sideways scroll (WCAG 1.4.10: 1280 px at 400% zoom).
 * A failure names the page, the role, the width, the rule and the element.
 *
 * Reads only: nothing is changed, so the tests run in parallel with each other and beside the flows
 * (playwright.config.ts, project "reads"). One browser context per role, signed in once through
 * next-auth's credentials endpoint.
 */
import AxeBuilder from "@axe-core/playwright";
import { expect, test, request as playwrightRequest, type Browser, type BrowserContext, type Page } from "@playwright/test";
import { ACCOUNTS } from "./support/accounts";
import { AUTHORIZATION_MATRIX, ROLES, type MatrixRole } from "./support/authorization-matrix";
import { OUTSIDER } from "./support/matrix-fixture-data";
import { matrixIds, type TrialIds } from "./support/matrix-ids";
import { SURFACE_CHECKS } from "./support/surface-checks";

test.describe.configure({ mode: "parallel" });

const TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"];
const DESKTOP = { width: 1440, height: 900 };
const PHONE = { width: 390, height: 844 };
const REFLOW = { width: 320, height: 800 };

async function contextFor(browser: Browser, baseURL: string, role: MatrixRole): Promise<BrowserContext> {
  if (role === "anonymous") return browser.newContext({ baseURL, viewport: DESKTOP });
  const who = role === "outsider" ? OUTSIDER : ACCOUNTS[role];
  const api = await playwrightRequest.newContext({ baseURL });
  const { csrfToken } = (await (await api.get("/api/auth/csrf")).json()) as { csrfToken: string };
  const res = await api.post("/api/auth/callback/credentials", { form: { email: who.email, password: who.password, csrfToken, json: "true", callbackUrl: "/trials" }, maxRedirects: 0 });
  const { url } = (await res.json()) as { url: string };
  expect(new URL(url, baseURL).searchParams.get("error"), `sign-in of ${who.email}`).toBeNull();
  const storageState = await api.storageState();
  await api.dispose();
  return browser.newContext({ baseURL, viewport: DESKTOP, storageState });
}

function fill(template: string, t: TrialIds): string | undefined {
  let unresolved = false;
  const out = template.replace(/\{(\w+)\}/g, (_, k: string) => {
    const v = t[k as keyof TrialIds];
    if (v === undefined) unresolved = true;
    return String(v);
  });
  return unresolved ? undefined : out;
}

/** The pages a role may open (expected 200 in the matrix), each placeholder resolved once per trial that has it. */
function pagesFor(role: MatrixRole): string[] {
  const ids = matrixIds();
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

/** Waits until the client parts are drawn: lazily loaded charts and grids, nothing busy. */
async function settle(page: Page) {
  await page.waitForLoadState("networkidle");
  await expect(page.getByText(/^(Drawing chart…|Loading the table…)$/)).toHaveCount(0, { timeout: 60_000 });
  await expect(page.locator('[aria-busy="true"]')).toHaveCount(0, { timeout: 60_000 });
}

/** Two animation frames, so a resize has been laid out (charts and grids follow the width). */
async function resizeTo(page: Page, size: { width: number; height: number }) {
  await page.setViewportSize(size);
  await expect.poll(() => page.evaluate(() => document.documentElement.clientWidth)).toBeLessThanOrEqual(size.width);
  await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
}

/** Serious and critical violations as readable lines: rule, help, and each element's selector. */
async function axeViolations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withTags(TAGS).analyze();
  return result.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .flatMap((v) => v.nodes.map((n) => `${v.id} (${v.impact}): ${v.help} at ${n.target.join(" ")}${n.failureSummary ? ` [${n.failureSummary.replace(/\s+/g, " ").slice(0, 200)}]` : ""}`));
}

/** Every chart frame on the page: visible title, summary, a numbers table with rows, the drawing hidden from assistive technology. */
async function chartProblems(page: Page): Promise<{ charts: number; problems: string[] }> {
  const charts = page.locator("figure[data-chart]");
  const n = await charts.count();
  const problems: string[] = [];
  for (let i = 0; i < n; i++) {
    const chart = charts.nth(i);
    // A chart that never draws fails here too.
    await expect(chart.locator(".js-plotly-plot")).toHaveCount(1, { timeout: 60_000 }).catch(() => problems.push(`chart ${i + 1}: never drawn`));
    const title = (await chart.locator("[data-chart-title]").textContent())?.trim() ?? "";
    if (!title || !(await chart.locator("[data-chart-title]").isVisible())) problems.push(`chart ${i + 1}: no visible title`);
    const summary = (await chart.locator("[data-chart-summary]").textContent())?.trim() ?? "";
    if (summary.length < 20 || !(await chart.locator("[data-chart-summary]").isVisible())) problems.push(`chart "${title}": no visible text summary`);
    if ((await chart.locator("[data-chart-numbers] summary", { hasText: "Show the numbers" }).count()) !== 1) problems.push(`chart "${title}": no "Show the numbers" disclosure`);
    if ((await chart.locator("[data-chart-numbers] table tbody tr").count()) < 1) problems.push(`chart "${title}": the numbers table is empty`);
    if ((await chart.locator('[aria-hidden="true"] .js-plotly-plot').count()) !== 1) problems.push(`chart "${title}": the drawing is not hidden from assistive technology`);
  }
  return { charts: n, problems };
}

async function surfaceProblems(page: Page, where: string): Promise<string[]> {
  const out: string[] = [];
  for (const check of SURFACE_CHECKS) for (const p of await check.run(page)) out.push(`${where}, ${check.name}: ${p}`);
  return out;
}

test("the accessibility check can fail: text below 4.5:1 is reported with its rule and element", async ({ browser, baseURL }) => {
  const ctx = await contextFor(browser, baseURL!, "sponsor");
  const page = await ctx.newPage();
  await page.goto("/trials");
  await settle(page);
  expect(await axeViolations(page)).toEqual([]);
  await page.evaluate(() => {
    const p = document.createElement("p");
    p.id = "axe-positive-control";
    p.style.cssText = "color:#9a9384;background:#f7f6f3";
    p.textContent = "Grey text on the page background, 2.9:1";
    document.querySelector("main")?.append(p);
  });
  const found = await axeViolations(page);
  expect(found.some((v) => v.startsWith("color-contrast (serious)") && v.includes("#axe-positive-control")), found.join("\n")).toBe(true);
  await ctx.close();
});

for (const role of ROLES) {
  const who = role === "anonymous" ? "open without signing in" : `the ${role} may open`;
  test(`every page ${who}: no serious or critical WCAG 2.2 AA violation, charts described, reads well at 1440 and 390 px, reflows at 320 px`, async ({ browser, baseURL }) => {
    const paths = pagesFor(role);
    expect(paths.length, `pages for ${role}`).toBeGreaterThan(0);
    // A bound on a hang, not a latency check: each visit waits for its lazy parts on a loaded machine.
    test.setTimeout(120_000 + paths.length * 60_000);
    const ctx = await contextFor(browser, baseURL!, role);
    const page = await ctx.newPage();
    const failures: string[] = [];
    let charts = 0;
    for (const path of paths) {
      await page.setViewportSize(DESKTOP);
      const res = await page.goto(path);
      expect(res?.status(), `${path} as ${role}`).toBe(200);
      await settle(page);
      const at = (size: { width: number }) => `${path} as ${role} at ${size.width} px`;
      for (const v of await axeViolations(page)) failures.push(`${at(DESKTOP)}: ${v}`);
      const c = await chartProblems(page);
      charts += c.charts;
      failures.push(...c.problems.map((p) => `${at(DESKTOP)}: ${p}`));
      failures.push(...(await surfaceProblems(page, at(DESKTOP))));
      await resizeTo(page, PHONE);
      failures.push(...(await surfaceProblems(page, at(PHONE))));
      await resizeTo(page, REFLOW);
      const scroll = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, width: document.documentElement.clientWidth }));
      if (scroll.scroll > scroll.width + 1) failures.push(`${at(REFLOW)}: reflow: the page is ${scroll.scroll} px wide in a ${scroll.width} px window`);
    }
    await ctx.close();
    // Those who see the closed review meet the accrual, prior, boundary, operating-characteristics and density
    // charts on both trials: a sweep that found none would have checked nothing.
    if (role === "dmc" || role === "statistician") expect(charts, `charts seen by the ${role}`).toBeGreaterThanOrEqual(12);
    expect(failures, failures.join("\n")).toEqual([]);
  });
}
