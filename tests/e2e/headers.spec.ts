/**
 * Attacks on what the browser keeps and runs: a cached copy of closed data (every page and API
 * answer is no-store), an injected inline script (pages carry a per-request nonce CSP without
 * 'unsafe-inline' for scripts; API answers a CSP that lets nothing load), and a chart sent to a
 * hosted service from the chart toolbar (no toolbar; a local "Download PNG" button instead).
 */
import { expect, test, type APIRequestContext } from "@playwright/test";
import { readFileSync } from "node:fs";
import { ACCOUNTS, credentialsSignIn } from "./support/accounts";
import { API_CONTENT_SECURITY_POLICY } from "../../lib/security-headers";

async function signInApi(request: APIRequestContext, who: keyof typeof ACCOUNTS) {
  await credentialsSignIn(request, ACCOUNTS[who].email, ACCOUNTS[who].password);
}

/** CRN-201 and its look 2 (locked, with counts), found as the DMC member finds them. */
async function demoLook(request: APIRequestContext): Promise<{ trial: string; analysis: string }> {
  const list = await (await request.get("/trials")).text();
  const trial = /href="\/trials\/(\d+)"[^>]*>CRN-201</.exec(list)?.[1] ?? "";
  const review = await (await request.get(`/trials/${trial}/review`)).text();
  const analysis = /href="\/trials\/\d+\/review\/(\d+)"[^>]*>Open look 2</.exec(review)?.[1] ?? "";
  expect(trial).toMatch(/^\d+$/);
  expect(analysis).toMatch(/^\d+$/);
  return { trial, analysis };
}

test("a cached copy of closed data: closed pages, closed API answers, exports and refusals are all no-store", async ({ request }) => {
  await signInApi(request, "dmc");
  const { trial, analysis } = await demoLook(request);
  const urls = [
    `/trials/${trial}/review/${analysis}`,
    `/trials/${trial}/review`,
    `/trials/${trial}`,
    `/api/trials/${trial}/analyses/${analysis}/review`,
    `/api/trials/${trial}/analyses/${analysis}/review/export`,
    `/api/trials/${trial}/analyses/${analysis}/patients`,
    `/api/trials/${trial}/analyses/${analysis}/recommendations`,
    `/api/trials/${trial}/audit`,
    `/api/trials/${trial}/open-status`,
    `/api/trials/${trial}/designs/2147480000`, // an error answer
  ];
  for (const url of urls) {
    const res = await request.get(url, { maxRedirects: 0 });
    expect(res.headers()["cache-control"] ?? "", `${url} (${res.status()})`).toMatch(/no-store/);
  }
  const rsc = await request.get(`/trials/${trial}/review/${analysis}`, { headers: { RSC: "1" } });
  expect(rsc.headers()["cache-control"] ?? "").toMatch(/no-store/);
});

test("an injected inline script: pages carry a fresh nonce CSP without 'unsafe-inline' for scripts, and every script has the nonce", async ({ request }) => {
  await signInApi(request, "sponsor");
  const policies: string[] = [];
  for (const url of ["/trials", "/trials", "/signin"]) {
    const res = await request.get(url, { maxRedirects: 0 });
    const csp = res.headers()["content-security-policy"] ?? "";
    const scriptSrc = /script-src ([^;]*)/.exec(csp)?.[1] ?? "";
    expect(scriptSrc, url).toMatch(/'nonce-[A-Za-z0-9+/=]{16,}'/);
    expect(scriptSrc, url).not.toContain("'unsafe-inline'");
    expect(scriptSrc, url).not.toContain("'unsafe-eval'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).toContain("frame-ancestors 'none'");
    policies.push(csp);
    if (res.status() !== 200) continue;
    const nonce = /'nonce-([^']+)'/.exec(scriptSrc)![1];
    const html = await res.text();
    const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
    expect(scripts.length, url).toBeGreaterThan(0);
    for (const tag of scripts) expect(tag, url).toContain(`nonce="${nonce}"`);
  }
  // A nonce is good for one answer only.
  expect(policies[0]).not.toBe(policies[1]);
});

test("an API answer opened in a tab can load or run nothing (strict CSP on route handlers, errors included)", async ({ request }) => {
  for (const url of ["/api/health", "/api/trials/1/open-status"]) {
    const res = await request.get(url);
    expect(res.headers()["content-security-policy"], url).toBe(API_CONTENT_SECURITY_POLICY);
    expect(res.headers()["cache-control"] ?? "", url).toMatch(/no-store/);
  }
});

test("a chart sent to a hosted service: no chart toolbar or hosted-editor link; a keyboard-reachable Download PNG saves a PNG", async ({ page }) => {
  // A review page with its charts on a shared two-core machine: rendering and loading the chart library take a while.
  test.setTimeout(180_000);
  const cspViolations: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy|Refused to (execute|load)/i.test(m.text())) cspViolations.push(m.text());
  });
  // Signed in through the credentials endpoint (page.request shares the page's cookies): the sign-in form is sign-in.spec.ts's.
  await signInApi(page.request, "dmc");
  const { trial, analysis } = await demoLook(page.request);
  await page.goto(`/trials/${trial}/review/${analysis}`);
  const button = page.getByRole("button", { name: /^Download PNG/ }).first();
  await expect(page.getByRole("figure").first()).toBeVisible({ timeout: 60_000 });
  await expect(button).toBeEnabled({ timeout: 90_000 });
  await expect(page.locator(".js-plotly-plot").first()).toBeVisible();
  // Plotly leaves an empty .modebar-container even with displayModeBar: false; no group or button may be in it.
  expect(await page.locator(".modebar-group, .modebar-btn").count()).toBe(0);
  await expect(page.getByText(/Chart Studio|Edit in|Produced with Plotly|plot\.ly/i)).toHaveCount(0);
  expect(await page.locator('a[href*="plot.ly"], a[href*="plotly.com"], a[href*="chart-studio"]').count()).toBe(0);

  // Reach the first chart's button from the keyboard alone.
  await page.locator("body").focus();
  let reached = false;
  for (let i = 0; i < 120 && !reached; i++) {
    await page.keyboard.press("Tab");
    reached = await button.evaluate((el) => el === document.activeElement);
  }
  expect(reached, "Download PNG reachable with Tab").toBe(true);
  const [download] = await Promise.all([page.waitForEvent("download"), page.keyboard.press("Enter")]);
  expect(download.suggestedFilename()).toMatch(/\.png$/);
  const bytes = readFileSync((await download.path())!);
  // The PNG signature (ISO/IEC 15948, section 5.2): 89 50 4E 47 0D 0A 1A 0A.
  expect([...bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  expect(cspViolations).toEqual([]);
});
