/**
 * The README's pictures, taken from the demo data by the test run and written to
 * public/screenshots/*.png: the open status (sponsor), the closed review of CRN-201's look 2 (DMC
 * member), the design studio (statistician) and the threshold search. The search needs an editable
 * draft, and the demo designs are locked, so it runs on a new single-arm trial made here with the
 * demo's invented sponsor. Each picture waits for what it shows, so a broken page fails the test.
 */
import { expect, test, type Page } from "@playwright/test";
import path from "node:path";
import { signIn } from "./support/accounts";
import { SEARCH_WORDS } from "@/lib/design/threshold-labels";

const OUT = path.resolve(import.meta.dirname, "../../public/screenshots");
const shot = (name: string) => path.join(OUT, `${name}.png`);

test.use({ viewport: { width: 1440, height: 900 } });

async function trialId(page: Page, code: string): Promise<string> {
  await page.goto("/trials");
  const href = await page.getByRole("link", { name: code, exact: true }).getAttribute("href");
  const id = /\/trials\/(\d+)/.exec(href ?? "")?.[1];
  expect(id).toMatch(/^\d+$/);
  return id!;
}

test("open status, as the sponsor sees it", async ({ page }) => {
  await signIn(page, "sponsor");
  await page.goto(`/trials/${await trialId(page, "CRN-201")}`);
  await expect(page.getByTestId("accrual")).toBeVisible();
  await expect(page.getByRole("table", { name: "Look schedule" })).toBeVisible();
  await page.waitForLoadState("networkidle", { timeout: 30_000 }).catch(() => undefined);
  await page.screenshot({ path: shot("open-status"), fullPage: true });
});

test("closed review of a locked look, as a DMC member sees it", async ({ page }) => {
  test.setTimeout(180_000);
  await signIn(page, "dmc");
  const id = await trialId(page, "CRN-201");
  await page.goto(`/trials/${id}/review`);
  await page.getByRole("link", { name: "Open look 2" }).click();
  await expect(page).toHaveURL(/\/review\/\d+$/);
  await expect(page.getByRole("figure").first()).toBeVisible({ timeout: 90_000 });
  await page.waitForLoadState("networkidle", { timeout: 60_000 }).catch(() => undefined);
  await page.screenshot({ path: shot("closed-review"), fullPage: true });
});

test("design studio and threshold search, as the statistician uses them", async ({ page }) => {
  test.setTimeout(300_000);
  await signIn(page, "statistician");
  await page.goto(`/trials/${await trialId(page, "CRN-201")}/design`);
  await expect(page.getByTestId("preview-status")).toHaveText("up to date", { timeout: 90_000 });
  await page.waitForLoadState("networkidle", { timeout: 60_000 }).catch(() => undefined);
  await page.screenshot({ path: shot("design-studio"), fullPage: true });

  // A draft to search on: a new single-arm trial of the same invented sponsor.
  const code = `CRN-${410 + (Date.now() % 80)}`;
  await page.goto("/trials/new");
  const form = page.getByRole("form", { name: "New trial" });
  await form.getByLabel("Trial code").fill(code);
  await form.getByLabel("Title").fill("TLM-417 in a second tumour type: a single-arm phase II study");
  await form.getByLabel("Sponsor").fill("Tallmoor Therapeutics (invented)");
  await form.getByLabel("Arm label").fill("TLM-417 400 mg");
  await form.getByLabel("Endpoint", { exact: true }).fill("Objective response by week 16");
  await form.getByLabel("Target enrolment").fill("40");
  await form.getByRole("button", { name: "Create trial" }).click();
  await expect(page).toHaveURL(/\/trials\/\d+\/design$/);
  await expect(page.getByTestId("preview-status")).toHaveText("up to date", { timeout: 90_000 });
  const search = page.getByRole("region", { name: SEARCH_WORDS.search });
  await search.getByLabel(SEARCH_WORDS.typeIErrorLimit).fill("0.1");
  await search.getByLabel(SEARCH_WORDS.powerTarget).fill("0.8");
  await search.getByLabel("Final success bar: from").fill("0.85");
  await search.getByLabel("Final success bar: to").fill("0.97");
  await search.getByLabel("Final success bar: step").fill("0.01");
  await search.getByLabel("Interim futility floor: from").fill("0");
  await search.getByLabel("Interim futility floor: to").fill("0.2");
  await search.getByLabel("Interim futility floor: step").fill("0.02");
  await search.getByRole("button", { name: SEARCH_WORDS.run }).click();
  await expect(search.getByText("Search complete.")).toBeVisible({ timeout: 180_000 });
  await expect(search.getByRole("figure").first()).toBeVisible();
  await page.waitForLoadState("networkidle", { timeout: 30_000 }).catch(() => undefined);
  await search.scrollIntoViewIfNeeded();
  await search.screenshot({ path: shot("threshold-search") });
});
