/**
 * How soon the design studio's charts follow an edit, in Debian's chromium against a running server
 * (scripts/up): a single-arm design with Nmax 200 and a look at every patient from 10, the target rate
 * changed back and forth, each time timed from the edit's input event to the last chart redrawn
 * (Plotly's plotly_afterplot on every chart of the page), less the studio's debounce
 * (PREVIEW_DEBOUNCE_MS: the preview waits until the inputs are still). Target (issue 15): under 300 ms.
 *   npm run bench:charts [-- --base http://localhost:3000] [--edits 20]
 * Uses, or makes once, an invented trial BENCH-CHARTS owned by the demo statistician.
 */
import { chromium, type Page } from "@playwright/test";
import { PREVIEW_DEBOUNCE_MS } from "@/lib/design/form-model";

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}
const base = arg("base", "http://localhost:3000");
const edits = Number(arg("edits", "20"));
const CODE = "BENCH-CHARTS";

async function signIn(page: Page) {
  await page.goto(`${base}/signin`);
  await page.getByLabel("E-mail").fill("statistician@cairn.example");
  await page.getByLabel("Password").fill("demo-stat-pass");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.getByTestId("signed-in-as").waitFor();
}

async function openBenchTrial(page: Page) {
  await page.goto(`${base}/trials`);
  const link = page.getByRole("link", { name: CODE, exact: true });
  if (await link.count()) {
    await page.goto(`${base}${await link.getAttribute("href")}/design`);
    return;
  }
  await page.goto(`${base}/trials/new`);
  const form = page.getByRole("form", { name: "New trial" });
  await form.getByLabel("Trial code").fill(CODE);
  await form.getByLabel("Title").fill("Chart refresh benchmark (invented single-arm study)");
  await form.getByLabel("Sponsor").fill("Benchmark sponsor (invented)");
  await form.getByLabel("Arm label").fill("Benchmark arm");
  await form.getByLabel("Endpoint", { exact: true }).fill("Response");
  await form.getByLabel("Target enrolment").fill("200");
  await form.getByRole("button", { name: "Create trial" }).click();
  await page.waitForURL(/\/trials\/\d+\/design$/);
}

const upToDate = (page: Page) => page.getByTestId("preview-status").filter({ hasText: "up to date" }).waitFor({ timeout: 60_000 });

const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", args: ["--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage"] });
try {
  const page = await (await browser.newContext({ viewport: { width: 1440, height: 900 } })).newPage();
  await signIn(page);
  await openBenchTrial(page);
  await page.getByLabel("Maximum sample size", { exact: true }).fill("200");
  await page.getByLabel("Every k patients").check();
  await page.getByLabel("First look at").fill("10");
  await page.getByLabel("Then every").fill("1");
  await page.getByLabel("p0, uninteresting rate").fill("0.2");
  await page.getByLabel("p1, target rate").fill("0.4");
  await upToDate(page);
  await page.locator("figure[data-chart] .js-plotly-plot").first().waitFor({ timeout: 60_000 });
  const charts = await page.locator("figure[data-chart] .js-plotly-plot").count();
  // Every redraw of every chart, and the time of the last input event, on the page's own clock. Plain
  // JavaScript text: tsx would wrap named functions in a helper that does not exist in the page.
  await page.evaluate(`(() => {
    window.draws = [];
    window.lastInput = 0;
    const watched = new Set();
    document.addEventListener("input", () => (window.lastInput = performance.now()), true);
    const watch = () => {
      for (const gd of document.querySelectorAll(".js-plotly-plot")) {
        if (watched.has(gd)) continue;
        watched.add(gd);
        gd.on("plotly_afterplot", () => window.draws.push(performance.now()));
      }
    };
    watch();
    new MutationObserver(watch).observe(document.body, { childList: true, subtree: true });
  })()`);
  const refresh: number[] = [];
  for (let i = 0; i < edits; i++) {
    await page.evaluate(() => ((window as unknown as { draws: number[] }).draws = []));
    await page.getByLabel("p1, target rate").fill(i % 2 ? "0.4" : "0.41");
    // Every chart redrawn after the edit, then the status settles: the last redraw ends the refresh.
    await page.waitForFunction((n) => (window as unknown as { draws: number[] }).draws.length >= n, charts, { timeout: 60_000 });
    await upToDate(page);
    await page.waitForTimeout(300);
    const { last, input } = await page.evaluate(() => {
      const w = window as unknown as { draws: number[]; lastInput: number };
      return { last: Math.max(...w.draws), input: w.lastInput };
    });
    refresh.push(last - input - PREVIEW_DEBOUNCE_MS);
  }
  refresh.sort((a, b) => a - b);
  const at = (p: number) => refresh[Math.min(refresh.length - 1, Math.ceil((p / 100) * refresh.length) - 1)];
  console.log(`Chart refresh after the ${PREVIEW_DEBOUNCE_MS} ms debounce, ${charts} charts, Nmax 200 with a look at every patient from 10, ${edits} edits (${new Date().toISOString()}):`);
  console.table([{ "median ms": at(50).toFixed(0), "p95 ms": at(95).toFixed(0), "max ms": refresh.at(-1)!.toFixed(0), "target ms": 300 }]);
} finally {
  await browser.close();
}
