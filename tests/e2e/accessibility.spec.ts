/**
 * WCAG 2.2 AA, checked by axe-core (@axe-core/playwright) on every page of the authorization matrix
 * (tests/e2e/support/authorization-matrix.ts), as every role that may open it (the rows whose cell is
 * 200), on both demo trials (CRN-201, single arm; CRN-305, two arms), with the WCAG 2.0, 2.1 and 2.2
 * A and AA tags: no serious or critical violation. A failure names the page, the role, the rule and
 * the elements. Each page is also narrowed to 320 CSS px and must not scroll sideways (reflow,
 * WCAG 1.4.10). A separate test checks every chart drawn: a visible title, a text summary and a
 * numbers table (components/charts/chart-figure.tsx).
 *
 * Fast on purpose: one browser context per role, signed in once through next-auth's credentials
 * endpoint and reused (its cookies become the context's storage state), one test per role visiting
 * its pages in turn. Reads only: nothing is changed.
 * The matrix's outsider account exists only with the matrix fixture (blinding-matrix.spec.ts); the
 * pages it may open (/trials, /account, /set-password) are checked here as the other roles.
 */
import AxeBuilder from "@axe-core/playwright";
import { expect, test, request as playwrightRequest, type Browser, type BrowserContext, type Page } from "@playwright/test";
import { ACCOUNTS, type AccountKey } from "./support/accounts";
import { AUTHORIZATION_MATRIX, type MatrixRole } from "./support/authorization-matrix";

const TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"];
const ROLES: (AccountKey | "anonymous")[] = ["admin", "statistician", "dmc", "sponsor", "coordinator", "anonymous"];
const TRIALS = ["CRN-201", "CRN-305"] as const;
type Ids = { trial: string; analysis?: string; meeting?: string };

const ids = new Map<string, Ids>();
const contexts = new Map<string, BrowserContext>();

async function signedInState(baseURL: string, who: AccountKey) {
  const ctx = await playwrightRequest.newContext({ baseURL });
  const { csrfToken } = (await (await ctx.get("/api/auth/csrf")).json()) as { csrfToken: string };
  const res = await ctx.post("/api/auth/callback/credentials", { form: { email: ACCOUNTS[who].email, password: ACCOUNTS[who].password, csrfToken, json: "true", callbackUrl: "/trials" }, maxRedirects: 0 });
  const { url } = (await res.json()) as { url: string };
  expect(new URL(url, baseURL).searchParams.get("error"), `sign-in of ${who}`).toBeNull();
  const state = await ctx.storageState();
  await ctx.dispose();
  return state;
}

async function contextFor(browser: Browser, baseURL: string, role: AccountKey | "anonymous") {
  let ctx = contexts.get(role);
  if (!ctx) {
    ctx = await browser.newContext({ baseURL, ...(role === "anonymous" ? {} : { storageState: await signedInState(baseURL, role) }) });
    contexts.set(role, ctx);
  }
  return ctx;
}

/** Waits until the client parts are drawn: lazily loaded charts and grids, nothing busy. */
export async function settle(page: Page) {
  await page.waitForLoadState("networkidle");
  await expect(page.getByText(/^(Drawing chart…|Loading the table…)$/)).toHaveCount(0, { timeout: 60_000 });
  await expect(page.locator('[aria-busy="true"]')).toHaveCount(0, { timeout: 60_000 });
}

/** Serious and critical violations as readable lines: rule, help, and each element's selector. */
async function axeViolations(page: Page): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withTags(TAGS).analyze();
  return result.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .flatMap((v) => v.nodes.map((n) => `${v.id} (${v.impact}): ${v.help} at ${n.target.join(" ")}${n.failureSummary ? ` [${n.failureSummary.replace(/\s+/g, " ").slice(0, 200)}]` : ""}`));
}

/** Every chart frame on the page: visible title, non-empty summary, a numbers table with rows. */
async function chartProblems(page: Page): Promise<{ charts: number; problems: string[] }> {
  const charts = page.locator("figure[data-chart]");
  const n = await charts.count();
  const problems: string[] = [];
  for (let i = 0; i < n; i++) {
    const chart = charts.nth(i);
    const title = (await chart.locator("[data-chart-title]").textContent())?.trim() ?? "";
    if (!title || !(await chart.locator("[data-chart-title]").isVisible())) problems.push(`chart ${i + 1}: no visible title`);
    const summary = (await chart.locator("[data-chart-summary]").textContent())?.trim() ?? "";
    if (summary.length < 20 || !(await chart.locator("[data-chart-summary]").isVisible())) problems.push(`chart "${title}": no visible text summary`);
    if ((await chart.locator("[data-chart-numbers] summary", { hasText: "Show the numbers" }).count()) !== 1) problems.push(`chart "${title}": no "Show the numbers" disclosure`);
    if ((await chart.locator("[data-chart-numbers] table tbody tr").count()) < 1) problems.push(`chart "${title}": the numbers table is empty`);
    if ((await chart.locator('[aria-hidden="true"] .js-plotly-plot').count()) !== 1) problems.push(`chart "${title}": the drawing is not hidden from assistive technology`);
    if ((await chart.locator(".modebar-btn").count()) !== 0) problems.push(`chart "${title}": the chart library's toolbar is shown`);
  }
  return { charts: n, problems };
}

const DESKTOP = { width: 1280, height: 800 };

/** How far the page scrolls sideways at the current width, naming the element that sticks out furthest; null when it does not. */
async function sidewaysScroll(page: Page): Promise<string | null> {
  // Wait until the resize has been laid out (charts and grids follow the width).
  await expect.poll(() => page.evaluate(() => document.documentElement.clientWidth)).toBeLessThanOrEqual(320);
  const { scroll, width, culprit } = await page.evaluate(() => {
    const width = document.documentElement.clientWidth;
    let culprit = "";
    let worst = width;
    for (const el of document.querySelectorAll<HTMLElement>("body *")) {
      const r = el.getBoundingClientRect();
      if (r.right > worst + 1) {
        worst = r.right;
        culprit = `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ""}.${String(el.className).split(" ").slice(0, 3).join(".")}`;
      }
    }
    return { scroll: document.documentElement.scrollWidth, width, culprit };
  });
  return scroll > width + 1 ? `${scroll} px wide at ${width} px (furthest out: ${culprit})` : null;
}

function pagesFor(role: AccountKey | "anonymous"): string[] {
  const out: string[] = [];
  for (const row of AUTHORIZATION_MATRIX) {
    if (row.kind !== "page" || row.pending || row.expect[role as MatrixRole] !== 200) continue;
    if (!row.path.includes("{trial}")) {
      out.push(row.path);
      continue;
    }
    for (const code of TRIALS) {
      const t = ids.get(code)!;
      let missing = false;
      const url = row.path.replace(/\{(\w+)\}/g, (_, k: string) => {
        const v = t[k as keyof Ids];
        if (v === undefined) missing = true;
        return String(v);
      });
      if (!missing) out.push(url);
    }
  }
  return out;
}

test.beforeAll(async ({ browser, baseURL }) => {
  test.setTimeout(180_000);
  // The demo trials' records, found as the statistician sees them (every page of a trial is open to them).
  const page = await (await contextFor(browser, baseURL!, "statistician")).newPage();
  for (const code of TRIALS) {
    await page.goto("/trials");
    const trial = (await page.getByRole("link", { name: code, exact: true }).getAttribute("href"))!.split("/").pop()!;
    await page.goto(`/trials/${trial}/analyses`);
    // The matrix's {analysis}: a locked look with counts (CRN-201 look 2, CRN-305 look 1).
    const look = code === "CRN-201" ? 2 : 1;
    const analysis = (await page.getByTestId(`look-row-${look}`).getByRole("link").getAttribute("href"))!.split("/").pop()!;
    await page.goto(`/trials/${trial}/meetings`);
    const meetingHref = await page.locator(`a[href^="/trials/${trial}/meetings/"]`).first().getAttribute("href", { timeout: 5_000 }).catch(() => null);
    ids.set(code, { trial, analysis, meeting: meetingHref?.split("/").pop() });
  }
  await page.close();
});

test.afterAll(async () => {
  for (const c of contexts.values()) await c.close();
});

test("the check can fail: text below 4.5:1 is reported with its rule and element", async ({ browser, baseURL }) => {
  const page = await (await contextFor(browser, baseURL!, "sponsor")).newPage();
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
  await page.close();
});

for (const role of ROLES) {
  test(`every page ${role === "anonymous" ? "open without signing in" : `the ${role} may open`} has no serious or critical WCAG 2.2 AA violation and reflows at 320 px`, async ({ browser, baseURL }) => {
    // One page after another in one context; each visit waits for its lazy parts on a loaded machine.
    test.setTimeout(600_000);
    const page = await (await contextFor(browser, baseURL!, role)).newPage();
    await page.setViewportSize(DESKTOP);
    const failures: string[] = [];
    const paths = pagesFor(role);
    expect(paths.length, `pages for ${role}`).toBeGreaterThan(0);
    for (const path of paths) {
      const res = await page.goto(path);
      expect(res?.status(), `${path} as ${role}`).toBe(200);
      await settle(page);
      for (const v of await axeViolations(page)) failures.push(`${path} as ${role}: ${v}`);
      // Reflow (WCAG 1.4.10): at 320 CSS px (1280 px at 400% zoom) the page must not scroll sideways.
      await page.setViewportSize({ width: 320, height: 800 });
      const wide = await sidewaysScroll(page);
      if (wide) failures.push(`${path} as ${role}: reflow: ${wide}`);
      await page.setViewportSize(DESKTOP);
    }
    await page.close();
    expect(failures, failures.join("\n")).toEqual([]);
  });
}

test("every chart has a visible title, a text summary and a numbers table (open status, design studio, closed review; both trials)", async ({ browser, baseURL }) => {
  test.setTimeout(300_000);
  const page = await (await contextFor(browser, baseURL!, "dmc")).newPage();
  const problems: string[] = [];
  let charts = 0;
  for (const code of TRIALS) {
    const t = ids.get(code)!;
    for (const path of [`/trials/${t.trial}`, `/trials/${t.trial}/design`, `/trials/${t.trial}/review/${t.analysis}`]) {
      await page.goto(path);
      await settle(page);
      // Wait until the charts are drawn, so a chart that never draws fails too.
      await expect(page.locator("figure[data-chart] .js-plotly-plot").first()).toBeVisible({ timeout: 60_000 });
      const c = await chartProblems(page);
      charts += c.charts;
      problems.push(...c.problems.map((p) => `${path}: ${p}`));
    }
  }
  await page.close();
  // Accrual on each overview, prior, boundary and operating-characteristics charts in the studio, the review's densities.
  expect(charts).toBeGreaterThanOrEqual(12);
  expect(problems, problems.join("\n")).toEqual([]);
});

