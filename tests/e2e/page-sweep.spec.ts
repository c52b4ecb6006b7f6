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
 * (playwright.config.ts, project "reads"). One test per role and place (outside a trial, each demo
 * trial, the fixture's meeting), each in a browser context signed in through next-auth's credentials
 * endpoint. On the design studio it waits until the preview is up to date, so its charts are there.
 */
import AxeBuilder from "@axe-core/playwright";
import { expect, test, type Browser, type BrowserContext, type Page } from "@playwright/test";
import { ACCOUNTS, credentialsSignIn } from "./support/accounts";
import { AUTHORIZATION_MATRIX, ROLES, type MatrixRole } from "./support/authorization-matrix";
import { OUTSIDER } from "./support/matrix-fixture-data";
import { fillPath, matrixIds } from "./support/matrix-ids";
import { SURFACE_CHECKS } from "./support/surface-checks";

test.describe.configure({ mode: "parallel" });

const TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"];
const DESKTOP = { width: 1440, height: 900 };
const PHONE = { width: 390, height: 844 };
const REFLOW = { width: 320, height: 800 };

/** Signs a browser context in through the credentials endpoint (its request shares the context's cookies). */
async function signInto(ctx: BrowserContext, role: MatrixRole) {
  const who = role === "outsider" ? OUTSIDER : ACCOUNTS[role as Exclude<MatrixRole, "outsider" | "anonymous">];
  expect(await credentialsSignIn(ctx.request, who.email, who.password), `sign-in of ${who.email}`).toBeNull();
}

async function contextFor(browser: Browser, baseURL: string, role: MatrixRole): Promise<BrowserContext> {
  const ctx = await browser.newContext({ baseURL, viewport: DESKTOP });
  if (role !== "anonymous") await signInto(ctx, role);
  return ctx;
}

/**
 * Where a page is seen: pages of no trial once, trial pages on each demo trial, meeting pages on the
 * fixture trial (meetings exist only there). One test per role and place, so the sweep spreads
 * over the free workers in even pieces.
 */
const PLACES = ["site", "single", "two", "fixture"] as const;
type Place = (typeof PLACES)[number];
const PLACE_WORDS: Record<Place, string> = { site: "outside a trial", single: "on CRN-201", two: "on CRN-305", fixture: "on the fixture trial's meeting" };

/** The matrix rows a role may open (expected 200) that are seen at a place; resolved to URLs inside a test. */
function rowsFor(role: MatrixRole, place: Place): string[] {
  return AUTHORIZATION_MATRIX.filter((row) => {
    if (row.kind !== "page" || row.pending || row.expect[role] !== 200) return false;
    if (!row.path.includes("{")) return place === "site";
    return row.path.includes("{meeting}") ? place === "fixture" : place === "single" || place === "two";
  }).map((row) => row.path);
}

/** Pages that draw charts for those who see the closed review: the open status (accrual), the design studio, the review. */
const CHART_PAGES = ["/trials/{trial}", "/trials/{trial}/design", "/trials/{trial}/review/{analysis}"];

/** Waits until the client parts are drawn: lazily loaded charts and grids, nothing busy. */
async function settle(page: Page) {
  await page.waitForLoadState("networkidle");
  // The design studio draws its charts from a preview computed after a debounce: wait for its answer.
  const preview = page.getByTestId("preview-status");
  if (await preview.count()) {
    // Or its refusal, at once (a session ended by a flow's sign-out shows here first).
    const refused = page.getByText("The preview could not be updated");
    await expect(preview.filter({ hasText: /^up to date$/ }).or(refused).first()).toBeVisible({ timeout: 60_000 });
    if (await refused.count()) throw new Error(`the design preview could not be updated: ${await refused.locator("..").textContent()}`);
  }
  await expect(page.getByText(/^(Drawing chart…|Loading the table…)$/)).toHaveCount(0, { timeout: 60_000 });
  await expect(page.locator('[aria-busy="true"]')).toHaveCount(0, { timeout: 60_000 });
}

/** Two animation frames, so a resize has been laid out (charts and grids follow the width). */
async function resizeTo(page: Page, size: { width: number; height: number }) {
  await page.setViewportSize(size);
  await expect.poll(() => page.evaluate(() => document.documentElement.clientWidth)).toBeLessThanOrEqual(size.width);
  await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
}

/**
 * Serious and critical violations as readable lines: rule, help, and each element's selector.
 * Chart drawings are left out: each is hidden from assistive technology behind its title, summary and
 * numbers table (checked in chartProblems, with "nothing focusable inside"), and its colours are the
 * palette's (lib/charts/palette.test.ts checks their contrast); their thousands of SVG nodes made up
 * most of axe's time on chart pages. Only violations are collected (axe's resultTypes), not every pass.
 */
async function axeViolations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withTags(TAGS).exclude("figure[data-chart] .js-plotly-plot").options({ resultTypes: ["violations"] }).analyze();
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
    // What is hidden from assistive technology must not take keyboard focus either (WCAG 4.1.2; axe's aria-hidden-focus).
    const focusable = await chart.locator('[aria-hidden="true"]').locator('a[href], button, input, select, textarea, [tabindex]:not([tabindex="-1"]), [contenteditable="true"]').count();
    if (focusable > 0) problems.push(`chart "${title}": ${focusable} focusable element(s) inside the hidden drawing`);
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

/** True when this context's session has ended: an API route then answers 401 (a role without access to the trial gets 403 or 404). */
async function sessionEnded(ctx: BrowserContext): Promise<boolean> {
  return (await ctx.request.get(`/api/trials/${matrixIds().single.trial}/open-status`, { maxRedirects: 0 })).status() === 401;
}

/** One visit of one page at the three widths: every problem found, as readable lines. */
async function checkPage(page: Page, role: MatrixRole, template: string, path: string): Promise<string[]> {
  const failures: string[] = [];
  await page.setViewportSize(DESKTOP);
  const res = await page.goto(path);
  expect(res?.status(), `${path} as ${role}`).toBe(200);
  // The page itself, not where a redirect led (a sign-in page also answers 200).
  expect(new URL(page.url()).pathname, `${path} as ${role}`).toBe(path);
  await settle(page);
  const at = (size: { width: number }) => `${path} as ${role} at ${size.width} px`;
  for (const v of await axeViolations(page)) failures.push(`${at(DESKTOP)}: ${v}`);
  const c = await chartProblems(page);
  failures.push(...c.problems.map((p) => `${at(DESKTOP)}: ${p}`));
  // Those who see the closed review meet charts on these pages: a sweep that found none would have checked nothing.
  if ((role === "dmc" || role === "statistician") && CHART_PAGES.includes(template) && c.charts === 0) failures.push(`${at(DESKTOP)}: no chart drawn`);
  failures.push(...(await surfaceProblems(page, at(DESKTOP))));
  await resizeTo(page, PHONE);
  failures.push(...(await surfaceProblems(page, at(PHONE))));
  await resizeTo(page, REFLOW);
  const scroll = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, width: document.documentElement.clientWidth }));
  if (scroll.scroll > scroll.width + 1) failures.push(`${at(REFLOW)}: reflow: the page is ${scroll.scroll} px wide in a ${scroll.width} px window`);
  return failures;
}

for (const role of ROLES) {
  const who = role === "anonymous" ? "open without signing in" : `the ${role} may open`;
  for (const place of PLACES) {
    const templates = rowsFor(role, place);
    if (templates.length === 0) continue;
    test(`every page ${who} ${PLACE_WORDS[place]}: no serious or critical WCAG 2.2 AA violation, charts described, reads well at 1440 and 390 px, reflows at 320 px`, async ({ browser, baseURL }) => {
      const ids = place === "site" ? null : matrixIds()[place];
      const paths = templates.map((t) => ({ template: t, path: ids ? fillPath(t, ids) : t })).filter((p): p is { template: string; path: string } => p.path !== undefined);
      expect(paths.length, `pages for ${role} ${PLACE_WORDS[place]}`).toBeGreaterThan(0);
      // A bound on a hang, not a latency check: each visit waits for its lazy parts on a loaded machine.
      test.setTimeout(120_000 + paths.length * 60_000);
      const ctx = await contextFor(browser, baseURL!, role);
      const page = await ctx.newPage();
      const failures: string[] = [];
      for (const { template, path } of paths) {
        // A flow that signs this person out (tests/e2e/sign-in.spec.ts) ends every session of theirs, this
        // one too (lib/auth/options.ts), at any moment of a visit: the page then sends to sign-in, or a
        // request the page makes after loading (the design preview) is refused. When the session is found
        // ended after a visit, whatever the visit found is set aside, and the page is seen again after signing in.
        for (let attempt = 1; ; attempt++) {
          let found: string[] = [];
          let thrown: unknown = null;
          try {
            found = await checkPage(page, role, template, path);
          } catch (e) {
            thrown = e;
          }
          if (role !== "anonymous" && attempt < 4 && (await sessionEnded(ctx))) {
            await signInto(ctx, role);
            continue;
          }
          if (thrown) throw thrown;
          failures.push(...found);
          break;
        }
      }
      await ctx.close();
      expect(failures, failures.join("\n")).toEqual([]);
    });
  }
}
