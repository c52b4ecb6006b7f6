/**
 * What it takes and what if, as a DMC member uses them: open the closed review of CRN-201's latest
 * locked look, read what the final analysis needs (checked against lib/stats computed here), type a
 * what-if and read the rule's verdict and predictive probability (checked against the engine's
 * decision at those counts), see bad input refused with the route's message, and on CRN-305 read the
 * two-arm region. Reads only: nothing in the demo data changes.
 */
import { expect, test, type Page } from "@playwright/test";
import { signIn } from "./support/accounts";
import { decideAtLook } from "@/lib/stats/decision";
import { singleArmWhatItTakes, twoArmWhatItTakes } from "@/lib/stats/what-it-takes";
import { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "@/db/seeds/demo-designs";


// The review page computes on the server and Plotly loads lazily: allow for a loaded shared machine.
test.describe.configure({ timeout: 300_000 });

async function openLatestReview(page: Page, code: string) {
  await page.getByRole("link", { name: code, exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/, { timeout: 60_000 });
  const trialPath = new URL(page.url()).pathname;
  await page.getByRole("link", { name: "Closed review" }).click();
  await expect(page).toHaveURL(`${trialPath}/review`, { timeout: 60_000 });
  await page.getByRole("link", { name: /^Open look \d+$/ }).first().click();
  await expect(page).toHaveURL(new RegExp(`${trialPath}/review/\\d+$`), { timeout: 60_000 });
  await expect(page.getByRole("heading", { name: /^Interim analysis, look \d+$/ })).toBeVisible({ timeout: 60_000 });
  const reviewPath = new URL(page.url()).pathname;
  const review = await (await page.request.get(`/api/trials/${trialPath.split("/").pop()}/analyses/${reviewPath.split("/").pop()}/review`)).json();
  return review as { arms: Array<{ responders: number; evaluable: number; pending: number }> };
}

test("a DMC member reads what it takes and asks what if on the single-arm trial", async ({ page }) => {
  await signIn(page, "dmc");
  const review = await openLatestReview(page, "CRN-201");
  const { responders, evaluable, pending } = review.arms[0];
  await expect(page.getByRole("table", { name: "Posterior summaries" })).toContainText(`${responders} / ${evaluable} / ${pending}`);

  // What it takes, against lib/stats on the same counts.
  const takes = singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders, evaluable, pending });
  await expect(page.getByRole("heading", { name: "What it takes", exact: true })).toBeVisible();
  await expect(page.getByTestId("what-it-takes-final")).toHaveText(takes.final!.sentence);
  await expect(page.getByTestId("what-it-takes-final")).toContainText(`among the remaining ${40 - evaluable} patients`);
  await expect(page.getByTestId("what-it-takes-row")).toHaveCount(takes.looks.length);

  // What if: 10 more evaluable patients, 3 of them responding, answered as typed, without a reload.
  await page.evaluate(() => ((window as unknown as { __sameDocument: boolean }).__sameDocument = true));
  await page.getByLabel(/^More evaluable patients/).fill("10");
  await page.getByLabel("Responders among them").fill("3");
  const ev = decideAtLook({ ...SINGLE_ARM_DEMO_DESIGN, safety: null }, { n: evaluable + 10, responders: responders + 3 });
  await expect(page.getByTestId("what-if-answer")).toContainText(`At ${responders + 3} responders of ${evaluable + 10}`);
  if (ev.predictiveProbability !== null) await expect(page.getByTestId("what-if-pp")).toHaveText(ev.predictiveProbability.toFixed(3));
  await expect(page.getByTestId("what-if-reason")).toHaveText(ev.decision.reason);
  await expect(page.getByTestId("what-if-verdict")).toHaveText(ev.decision.action === "stop" ? /^Stop for/ : ev.decision.action === "final" ? /^Final analysis/ : "Continue");
  await expect(page.getByRole("figure", { name: /the supposed one \(dashed\)/ }).locator(".main-svg").first()).toBeVisible({ timeout: 60_000 });

  // A preset fills the responders from a rate: p0 = 0.2 of 10 patients is 2.
  await page.getByRole("button", { name: /^Respond at p0/ }).click();
  await expect(page.getByLabel("Responders among them")).toHaveValue("2");
  await expect(page.getByTestId("what-if-answer")).toContainText(`At ${responders + 2} responders of ${evaluable + 10}`);

  // Bad input: the route's 422 message is shown, and the page stays.
  await page.getByLabel("Responders among them").fill("11");
  await expect(page.getByTestId("what-if-answer")).toContainText("must not exceed the 10 hypothetical patients");
  await page.getByLabel(/^More evaluable patients/).fill("2.5");
  await expect(page.getByTestId("what-if-answer")).toContainText("patients must be a whole number");
  expect(await page.evaluate(() => (window as unknown as { __sameDocument?: boolean }).__sameDocument)).toBe(true);
});

test("a DMC member reads the two-arm region of what it takes", async ({ page }) => {
  await signIn(page, "dmc");
  const review = await openLatestReview(page, "CRN-305");
  const [t, c] = review.arms;
  const takes = twoArmWhatItTakes(TWO_ARM_DEMO_DESIGN, { respondersT: t.responders, evaluableT: t.evaluable, pendingT: t.pending, respondersC: c.responders, evaluableC: c.evaluable, pendingC: c.pending });
  await expect(page.getByTestId("what-it-takes-final")).toHaveText(takes.final!.sentence);
  await expect(page.getByRole("figure", { name: /^Outcome region at the final analysis/ }).locator(".main-svg").first()).toBeVisible({ timeout: 60_000 });
  await page.getByLabel(/more patients/).first().fill("20");
  await expect(page.getByTestId("what-if-answer")).toContainText(/At experimental \d+ of \d+, control \d+ of \d+/);
});
