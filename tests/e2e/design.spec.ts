/**
 * The design studio as a statistician uses it: create a single-arm and a two-arm trial, fill in
 * the design, read the boundaries and operating characteristics computed on the server (checked
 * against lib/stats called directly here), calibrate, pick a design, and lock it with a signature.
 * Creates its own trials (unique codes), so it does not depend on other specs.
 */
import { expect, test, type Page } from "@playwright/test";
import { ACCOUNTS, signIn } from "./support/accounts";
import { typeIErrorAndPower, twoArmTypeIErrorAndPower } from "@/lib/stats/operating-characteristics";
import { singleArmBoundaries } from "@/lib/stats/boundaries";
import { calibrateSingleArm } from "@/lib/stats/calibration";
import { groupByCharacteristics } from "@/lib/design/calibration-groups";
import { formatBoundary, formatProbability } from "@/lib/format";
import type { SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";
import { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "@/db/seeds/demo-designs";

const suffix = `${Date.now() % 1_000_000}`;

async function createTrial(page: Page, opts: { code: string; designType: "single" | "two" }) {
  await page.goto("/trials");
  await page.getByRole("link", { name: "New trial" }).click();
  await expect(page).toHaveURL(/\/trials\/new$/);
  const form = page.getByRole("form", { name: "New trial" });
  // Nothing typed: field errors, nothing created.
  await form.getByRole("button", { name: "Create trial" }).click();
  await expect(form.getByText("Enter a title.")).toHaveCount(2); // at the top of the form and beside the field
  await form.getByLabel("Trial code").fill(opts.code);
  await form.getByLabel("Title").fill(`Invented ${opts.designType === "two" ? "randomised" : "single-arm"} study ${opts.code}`);
  await form.getByLabel("Sponsor").fill("Brackenfold Biologics (invented)");
  if (opts.designType === "two") {
    await form.getByLabel("Two arms (experimental and control)").check();
    await form.getByLabel("Experimental arm label").fill("BRK-22 plus standard care");
    await form.getByLabel("Control arm label").fill("Standard care");
  } else {
    await form.getByLabel("Arm label").fill("BRK-11");
  }
  await form.getByLabel("Endpoint", { exact: true }).fill("Objective response at week 12");
  await form.getByLabel("Target enrolment").fill(opts.designType === "two" ? "80" : "40");
  await form.getByRole("button", { name: "Create trial" }).click();
  await expect(page).toHaveURL(/\/trials\/\d+\/design$/);
  await expect(page.getByText("No design yet.")).toBeVisible();
}

async function waitForPreview(page: Page) {
  await expect(page.getByTestId("preview-status")).toHaveText("up to date", { timeout: 60_000 });
}

test("a statistician designs a single-arm trial, calibrates it and locks it with a signature", async ({ page }) => {
  test.setTimeout(300_000);
  await signIn(page, "statistician");
  await createTrial(page, { code: `E2E-S-${suffix}`, designType: "single" });

  await page.getByLabel(/Prior on the response rate/).selectOption("beta");
  await page.getByLabel("a", { exact: true }).fill("0.6");
  await page.getByLabel("b", { exact: true }).fill("0.4");
  await page.getByLabel("p0, uninteresting rate").fill("0.2");
  await page.getByLabel("p1, target rate").fill("0.4");
  await page.getByLabel("Maximum sample size").fill("40");
  await page.getByLabel("A list of enrolled counts").check();
  await page.getByLabel("Looks at (patients enrolled)").fill("10, 20, 30");
  await page.getByLabel("Final success bar θT", { exact: true }).fill("0.9");
  await page.getByLabel("Interim futility floor θL", { exact: true }).fill("0.05");

  // A bad value shows its error next to the field and the preview waits.
  await page.getByLabel("p1, target rate").fill("0.1");
  await expect(page.getByText("p1 must be above p0.")).toBeVisible();
  await expect(page.getByTestId("preview-status")).toHaveText("waiting for valid inputs");
  await page.getByLabel("p1, target rate").fill("0.4");

  // The demo's single-arm design, with looks at 10, 20 and 30 and no safety rule (as typed above).
  const design: SingleArmDesign = { ...SINGLE_ARM_DEMO_DESIGN, looks: { kind: "list", sizes: [10, 20, 30] }, safety: null };
  const engine = typeIErrorAndPower(design);
  await waitForPreview(page);
  await expect(page.getByTestId("oc-type-i-error")).toHaveText(formatProbability(engine.typeIError));
  await expect(page.getByTestId("oc-power")).toHaveText(formatProbability(engine.power));
  await expect(page.getByTestId("oc-en-null")).toHaveText(engine.atNull.expectedSampleSize.toFixed(1));
  // The boundary grid shows the engine's futility bound at the first look ("none" when no count stops).
  const firstLook = singleArmBoundaries(design).response[0];
  const grid = page.getByRole("region", { name: "Stopping boundaries" });
  await expect(grid.locator('[row-index="0"] [col-id="futility"]')).toHaveText(formatBoundary(firstLook.futilityMax));
  await expect(page.getByTestId("prior-ess").first()).toHaveText("1.0");
  // Early termination is shown split by reason.
  await expect(page.getByTestId("oc-early-futility-null")).toHaveText(formatProbability(engine.atNull.pEarlyFutility));
  await expect(page.getByTestId("oc-early-efficacy-null")).toHaveText(formatProbability(engine.atNull.pEarlyEfficacy));

  // The uncertain-standard rule with a safety rule against an uncertain standard: the preview follows the
  // engine and shows the joint characteristics with the independence assumption stated.
  await page.getByLabel("Rule", { exact: true }).selectOption("uncertainStandard");
  await page.getByLabel("Standard rate aS").fill("10");
  await page.getByLabel("Standard rate bS").fill("40");
  await page.getByLabel("Interim futility floor pL", { exact: true }).fill("0.05");
  await page.getByText("Monitor toxicity").click();
  await page.getByLabel("Compare the toxicity rate with").selectOption("uncertainStandard");
  await page.getByLabel("Standard toxicity aS").fill("6");
  await page.getByLabel("Standard toxicity bS").fill("24");
  await page.getByLabel("Margin", { exact: true }).fill("0.1");
  const withSafety: SingleArmDesign = {
    ...design,
    rule: { ...design.rule, kind: "uncertainStandard", standard: { a: 10, b: 40 } },
    safety: { kind: "uncertainStandard", standard: { a: 6, b: 24 }, margin: 0.1, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.9 },
  };
  await waitForPreview(page);
  await expect(page.getByTestId("oc-type-i-error")).toHaveText(formatProbability(typeIErrorAndPower(withSafety).typeIError));
  await expect(page.getByTestId("safety-oc-assumption")).toContainText("response and toxicity are independent");
  await page.getByLabel("Rule", { exact: true }).selectOption("predictive");
  await page.getByLabel("Interim futility floor θL", { exact: true }).fill("0.05");
  await page.getByText("Monitor toxicity").click();
  await waitForPreview(page);
  await expect(page.getByTestId("oc-type-i-error")).toHaveText(formatProbability(engine.typeIError));

  await page.getByRole("button", { name: "Save draft" }).click();
  await expect(page.getByText(/Draft version 1 saved/)).toBeVisible();

  // Calibration on a small grid; the best design is the engine's best design.
  await page.getByLabel("Type I error limit").fill("0.15");
  await page.getByLabel("Power target").fill("0.7");
  await page.getByLabel("Final success bar: from").fill("0.85");
  await page.getByLabel("Final success bar: to").fill("0.95");
  await page.getByLabel("Final success bar: step").fill("0.05");
  await page.getByLabel("Interim futility floor: from").fill("0");
  await page.getByLabel("Interim futility floor: to").fill("0.1");
  await page.getByLabel("Interim futility floor: step").fill("0.05");
  await page.getByRole("button", { name: "Search thresholds" }).click();
  await expect(page.getByText("Search complete.")).toBeVisible({ timeout: 60_000 });
  const expected = calibrateSingleArm(design, { thetaTGrid: [0.85, 0.9, 0.95], thetaLGrid: [0, 0.05, 0.1], typeIErrorLimit: 0.15, powerTarget: 0.7, keep: 30 });
  expect(expected.best.length).toBeGreaterThan(0);
  // Threshold sets with identical operating characteristics share a row.
  await expect(page.getByTestId("calibration-result")).toHaveCount(groupByCharacteristics(expected.best).length);
  await page.getByTestId("calibration-result").first().getByRole("button", { name: /Use this design/ }).first().click();
  await expect(page.getByLabel("Final success bar θT", { exact: true })).toHaveValue(String(expected.best[0].thetaT));
  await expect(page.getByLabel("Interim futility floor θL", { exact: true })).toHaveValue(String(expected.best[0].thetaL));
  const chosen = typeIErrorAndPower({ ...design, rule: { ...design.rule, thetaT: expected.best[0].thetaT, futilityThreshold: expected.best[0].thetaL } });
  await waitForPreview(page);
  await expect(page.getByTestId("oc-type-i-error")).toHaveText(formatProbability(chosen.typeIError));
  await page.getByRole("button", { name: "Save draft" }).click();
  await expect(page.getByText(/Draft version 1 saved \(revision 2\)/)).toBeVisible();

  // Lock: a wrong password signs nothing; the right one locks and shows the signature.
  await page.getByLabel("Your password (to sign)").fill("not-my-password");
  await page.getByRole("button", { name: "Sign and lock version 1" }).click();
  await expect(page.getByText("The password is not correct, so nothing was signed.")).toBeVisible();
  await page.getByLabel("Your password (to sign)").fill(ACCOUNTS.statistician.password);
  await page.getByRole("button", { name: "Sign and lock version 1" }).click();
  await expect(page.getByText(/Version 1 is locked as the charter version/)).toBeVisible();
  const signature = page.getByTestId("design-version-1").getByTestId("design-signature");
  await expect(signature).toContainText(`Signed by ${ACCOUNTS.statistician.name}`);
  await expect(signature).toContainText("design approved");
  await expect(page.getByRole("button", { name: "Save draft" })).toHaveCount(0);

  // The charter version is read-only; a change is an amendment with a reason.
  await page.getByRole("button", { name: "Start amendment" }).click();
  await expect(page.getByText("Give the reason for the amendment (at least 5 characters).")).toBeVisible();
  await page.getByLabel("Reason for the amendment").fill("Add a look at 25 patients");
  await page.getByRole("button", { name: "Start amendment" }).click();
  await expect(page.getByText(/Amendment started: draft version 2/)).toBeVisible();
  await expect(page.getByTestId("design-version-2")).toContainText("Amendment: Add a look at 25 patients");
  await expect(page.getByTestId("design-version-1")).toContainText("Charter version (locked)");
});

test("a statistician designs a two-arm trial and the operating characteristics match the engine", async ({ page }) => {
  // Two-arm previews are the heaviest computation in the browser tests; on a loaded machine more than the default bound.
  test.setTimeout(300_000);
  await signIn(page, "statistician");
  await createTrial(page, { code: `E2E-T-${suffix}`, designType: "two" });
  await page.getByLabel(/Prior on the control arm/).selectOption("informative");
  await page.getByLabel("Prior mean").fill("0.3");
  await page.getByLabel("Effective sample size").fill("10");
  await page.getByLabel("Control rate", { exact: true }).fill("0.3");
  await page.getByLabel("Experimental rate").fill("0.5");
  await page.getByLabel("Maximum sample size per arm").fill("40");
  await page.getByLabel("Stop early for efficacy").check();
  await page.getByLabel("Early-success bar θU", { exact: true }).fill("0.99");
  // The demo's two-arm design with 40 per arm and looks every 10 from 20 (as typed above).
  const design: TwoArmDesign = { ...TWO_ARM_DEMO_DESIGN, nMaxPerArm: 40, looks: { kind: "every", first: 20, every: 10 } };
  const engine = twoArmTypeIErrorAndPower(design);
  await waitForPreview(page);
  await expect(page.getByTestId("oc-type-i-error")).toHaveText(formatProbability(engine.typeIError));
  // The two-arm type I error is the maximum on the null boundary pT = pC + δ, and the label says so.
  await expect(page.getByText(`Type I error at pT = pC (δ = 0), maximum over control rates from ${engine.controlRateRange.from} to ${engine.controlRateRange.to}`, { exact: false })).toBeVisible();
  await expect(page.getByTestId("oc-type-i-error-at-control")).toHaveText(formatProbability(engine.typeIErrorAtControlRate as number));
  await expect(page.getByTestId("oc-power")).toHaveText(formatProbability(engine.power));
  await expect(page.getByTestId("prior-ess").nth(1)).toHaveText("10.0");
  await page.getByRole("button", { name: "Save draft" }).click();
  await expect(page.getByText(/Draft version 1 saved/)).toBeVisible();
});
