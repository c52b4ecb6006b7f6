/**
 * The closed review as a DMC member and a sponsor would use it: the DMC member opens the latest
 * locked analysis of CRN-201, reads the charts, asks an interval question (the answer is checked
 * against lib/stats computed here) and records a recommendation with an e-signature; the sponsor
 * sees the recommendation and accrual and cannot reach the closed page or API.
 * Changes demo data: the analysis opened becomes "reviewed".
 */
import { expect, test, type Page } from "@playwright/test";
import { ACCOUNTS, signIn } from "./support/accounts";
import { findOutcomeData } from "./support/authorization-matrix";
import { betaCdf } from "@/lib/stats/distributions";
import { SINGLE_ARM_DEMO_DESIGN } from "@/db/seeds/demo-designs";

// The review page computes on the server and Plotly loads lazily: allow for a loaded shared machine.
test.describe.configure({ mode: "serial", timeout: 300_000 });

/** The demo single-arm design's prior, Beta(0.6, 0.4) (db/seeds/demo-designs.ts). */
const PRIOR = (() => {
  const p = SINGLE_ARM_DEMO_DESIGN.prior;
  if (p.family !== "beta") throw new Error("the demo single-arm design's prior is expected to be a Beta prior");
  return p;
})();
let trialPath = "";
let reviewPath = "";
let recordedLabel = "";

async function expectCaution(page: Page) {
  await expect(page.getByTestId("caution")).toContainText("Decision support only");
}

test("the DMC member opens the latest analysis, reads the plots, asks an interval question and records a signed recommendation", async ({ page }) => {
  await signIn(page, "dmc");
  await page.getByRole("link", { name: "CRN-201", exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/, { timeout: 60_000 });
  trialPath = new URL(page.url()).pathname;
  await expectCaution(page);

  await page.getByRole("link", { name: "Closed review" }).click();
  await expect(page).toHaveURL(`${trialPath}/review`, { timeout: 60_000 });
  await expectCaution(page);
  // The list is newest first: the first "Open look" link is the latest locked analysis.
  const latest = page.getByRole("link", { name: /^Open look \d+$/ }).first();
  await latest.click();
  await expect(page).toHaveURL(new RegExp(`${trialPath}/review/\\d+$`), { timeout: 60_000 });
  reviewPath = new URL(page.url()).pathname;
  await expect(page.getByRole("heading", { name: /^Interim analysis, look \d+$/ })).toBeVisible({ timeout: 60_000 });
  await expectCaution(page);

  // Plots drawn (Plotly renders its SVG inside the figure), decision and its reason shown.
  await expect(page.getByRole("figure", { name: "Posterior density of the response rate" }).locator(".main-svg").first()).toBeVisible({ timeout: 60_000 });
  await expect(page.getByRole("figure", { name: "Stopping boundaries and the observed path" }).locator(".main-svg").first()).toBeVisible();
  await expect(page.getByRole("figure", { name: "Posterior density of the toxicity rate" })).toBeVisible();
  await expect(page.getByTestId("decision-reason")).not.toBeEmpty();
  await expect(page.getByRole("table", { name: "Posterior summaries" })).toBeVisible();

  // The counts behind the page, read as the DMC member may, to compute the expected answer here.
  const analysisId = reviewPath.split("/").pop();
  const reviewJson = await (await page.request.get(`/api/trials/${trialPath.split("/").pop()}/analyses/${analysisId}/review`)).json();
  const { responders, evaluable } = reviewJson.arms[0];
  await expect(page.getByRole("table", { name: "Posterior summaries" })).toContainText(`${responders} / ${evaluable}`);
  await expect(page.getByRole("columnheader", { name: /^Wilson \d+%$/ })).toBeVisible();
  // Every look done is placed against the boundaries at its actual evaluable count, planned size beside it.
  const observed = page.getByRole("table", { name: "Looks done against the boundaries at their actual size" });
  await expect(observed.getByTestId("observed-boundary-row")).toHaveCount(reviewJson.observedBoundaries.length);
  const last = reviewJson.observedBoundaries.at(-1);
  await expect(observed.getByTestId("observed-boundary-row").last()).toContainText(String(last.n));
  await expect(page.getByTestId("review-versions")).toContainText(/design version \d+ · review version \d+/);

  // The interval question, answered as they type, without a reload.
  await page.evaluate(() => ((window as unknown as { __sameDocument: boolean }).__sameDocument = true));
  await page.getByLabel("From (rate between 0 and 1)").fill("0.25");
  await page.getByLabel("To (rate between 0 and 1)").fill("0.45");
  const a = PRIOR.a + responders;
  const b = PRIOR.b + evaluable - responders;
  const expected = (betaCdf(0.45, a, b) - betaCdf(0.25, a, b)).toFixed(3);
  await expect(page.getByTestId("interval-probability")).toHaveText(expected);
  await expect(page.getByTestId("interval-answer")).toContainText("25.0%");
  await expect(page.getByTestId("interval-answer")).toContainText("45.0%");
  await page.getByLabel("To (rate between 0 and 1)").fill("0.1");
  await expect(page.getByTestId("interval-answer")).toContainText("The lower end must be below the upper end.");
  await page.getByLabel("To (rate between 0 and 1)").fill("0.35");
  await expect(page.getByTestId("interval-probability")).toHaveText((betaCdf(0.35, a, b) - betaCdf(0.25, a, b)).toFixed(3));
  expect(await page.evaluate(() => (window as unknown as { __sameDocument?: boolean }).__sameDocument)).toBe(true);

  // The reproducibility record downloads as JSON with the engine version.
  const exportRes = await page.request.get(`/api/trials/${trialPath.split("/").pop()}/analyses/${analysisId}/review/export`);
  expect(exportRes.headers()["content-disposition"]).toMatch(/attachment; filename=".*closed-review\.json"/);
  expect((await exportRes.json()).engineVersion).toMatch(/^\d+\.\d+\.\d+$/);

  // Record the recommendation: a wrong password signs nothing; the right one records and signs.
  const form = page.getByRole("form", { name: /Record (the recommendation|a correction)/ });
  await form.getByLabel("Committee's recommendation").selectOption("continue_modified");
  await form.getByLabel(/^Rationale/).fill("Continue; the committee asks for the toxicity listing before the next look.");
  await form.getByLabel("Password (electronic signature)").fill("wrong-password");
  await form.getByRole("button", { name: /Sign and record/ }).click();
  await expect(form.getByText("The password is not correct, so nothing was signed.").first()).toBeVisible();
  // A refused attempt keeps the member's choice and words (nothing silently falls back to another decision).
  await expect(form.getByLabel("Committee's recommendation")).toHaveValue("continue_modified");
  await expect(form.getByLabel(/^Rationale/)).toHaveValue(/toxicity listing/);
  await form.getByLabel("Password (electronic signature)").fill(ACCOUNTS.dmc.password);
  await form.getByRole("button", { name: /Sign and record/ }).click();
  await expect(page.getByRole("status").filter({ hasText: /(Recommendation|Correction) recorded and signed\./ })).toBeVisible();
  const entry = page.getByTestId("recorded-recommendation").first();
  await expect(entry).toContainText("Continue with modification");
  await expect(entry).toContainText("toxicity listing before the next look");
  await expect(entry).toContainText(`signed by ${ACCOUNTS.dmc.name} (recommendation recorded)`);
  recordedLabel = "Continue with modification";
});

test("the sponsor sees the recommendation and accrual, and is refused the closed page and API", async ({ page }) => {
  expect(reviewPath).not.toBe("");
  await signIn(page, "sponsor");
  await page.goto(trialPath);
  await expectCaution(page);
  await expect(page.getByTestId("latest-recommendation")).toContainText(recordedLabel);
  await expect(page.getByTestId("latest-recommendation")).toContainText(/recorded \d{4}-\d{2}-\d{2}/);
  await expect(page.getByTestId("accrual")).toContainText(/\d+ of 44 planned/);
  await expect(page.getByRole("figure", { name: "Accrual over time, pooled across arms" }).locator(".main-svg").first()).toBeVisible({ timeout: 60_000 });
  await expect(page.getByRole("link", { name: "Closed review" })).toHaveCount(0);
  const html = await page.content();
  expect(findOutcomeData(html)).toEqual([]);
  expect(html).not.toContain("toxicity listing before the next look");

  // Typing the closed URLs.
  const closedPage = await page.goto(reviewPath);
  expect(closedPage?.status()).toBe(403);
  await expect(page.getByRole("heading", { name: "Not available to your role" })).toBeVisible();
  expect(findOutcomeData(await page.content())).toEqual([]);
  const listPage = await page.goto(`${trialPath}/review`);
  expect(listPage?.status()).toBe(403);

  const [trialId, analysisId] = [trialPath.split("/").pop(), reviewPath.split("/").pop()];
  for (const url of [`/api/trials/${trialId}/analyses/${analysisId}/review`, `/api/trials/${trialId}/analyses/${analysisId}/review/export`, `/api/trials/${trialId}/analyses/${analysisId}/interval?arm=1&lo=0.2&hi=0.4`, `/api/trials/${trialId}/analyses/${analysisId}/recommendations`]) {
    const res = await page.request.get(url);
    expect(res.status(), url).toBe(403);
    const body = await res.text();
    expect(findOutcomeData(body), url).toEqual([]);
    expect(body).not.toContain("toxicity listing");
  }
});
