/**
 * The threshold search of the design studio for a two-arm design: a statistician runs a small
 * search, watches its progress, reads the chart and the table, and applies a design. The table is
 * checked against lib/stats called directly here (calibrateTwoArm, and twoArmTypeIErrorAndPower for
 * the applied design in the live preview). Creates its own trial (unique code).
 */
import { expect, test, type Page } from "@playwright/test";
import { signIn } from "./support/accounts";
import { calibrateTwoArm } from "@/lib/stats/calibration-two-arm";
import { twoArmTypeIErrorAndPower } from "@/lib/stats/operating-characteristics";
import { groupByCharacteristics } from "@/lib/design/calibration-groups";
import { SEARCH_WORDS } from "@/lib/design/threshold-labels";
import { formatProbability } from "@/lib/format";
import type { TwoArmDesign } from "@/lib/stats/types";

const code = `E2E-C-${Date.now() % 1_000_000}`;

async function createTwoArmTrial(page: Page) {
  await page.goto("/trials");
  await page.getByRole("link", { name: "New trial" }).click();
  const form = page.getByRole("form", { name: "New trial" });
  await form.getByLabel("Trial code").fill(code);
  await form.getByLabel("Title").fill(`Invented randomised study ${code}`);
  await form.getByLabel("Sponsor").fill("Brackenfold Biologics (invented)");
  await form.getByLabel("Two arms (experimental and control)").check();
  await form.getByLabel("Experimental arm label").fill("BRK-22 plus standard care");
  await form.getByLabel("Control arm label").fill("Standard care");
  await form.getByLabel("Endpoint", { exact: true }).fill("Objective response at week 12");
  await form.getByLabel("Target enrolment").fill("60");
  await form.getByRole("button", { name: "Create trial" }).click();
  await expect(page).toHaveURL(/\/trials\/\d+\/design$/);
}

test("a statistician runs a two-arm threshold search, reads the chart and the table, and applies a design", async ({ page }) => {
  test.setTimeout(300_000);
  await signIn(page, "statistician");
  await createTwoArmTrial(page);
  await page.getByLabel("Control rate", { exact: true }).fill("0.3");
  await page.getByLabel("Experimental rate").fill("0.6");
  await page.getByLabel("Maximum sample size per arm").fill("30");
  await page.getByLabel("Stop early for efficacy").check();
  // The form's labels are being reworded elsewhere; either wording is the same field.
  await page.getByLabel(/Efficacy threshold θU|Early-success bar/).first().fill("0.99");
  const design: TwoArmDesign = {
    arms: "two",
    priorT: { family: "uniform" },
    priorC: { family: "uniform" },
    controlRate: 0.3,
    experimentalRate: 0.6,
    delta: 0,
    nMaxPerArm: 30,
    looks: { kind: "every", first: 20, every: 10 },
    rule: { kind: "predictive", thetaT: 0.95, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.99 },
    safety: null,
  };
  await expect(page.getByTestId("preview-status")).toHaveText("up to date", { timeout: 60_000 });

  const search = page.getByRole("region", { name: SEARCH_WORDS.search });
  await search.getByLabel(SEARCH_WORDS.typeIErrorLimit).fill("0.2");
  await search.getByLabel(SEARCH_WORDS.powerTarget).fill("0.5");
  await search.getByLabel("Final success bar: from").fill("0.85");
  await search.getByLabel("Final success bar: to").fill("0.95");
  await search.getByLabel("Final success bar: step").fill("0.05");
  await search.getByLabel("Interim futility floor: from").fill("0");
  await search.getByLabel("Interim futility floor: to").fill("0.1");
  await search.getByLabel("Interim futility floor: step").fill("0.05");
  await search.getByLabel("Early-success bar: from").fill("0.97");
  await search.getByLabel("Early-success bar: to").fill("0.99");
  await search.getByLabel("Early-success bar: step").fill("0.02");
  await search.getByRole("button", { name: SEARCH_WORDS.run }).click();

  // Progress: the bar is there while it runs and full at the end, with every threshold set counted.
  await expect(search.getByTestId("calibration-progress")).toBeVisible();
  await expect(search.getByText("Search complete.")).toBeVisible({ timeout: 120_000 });
  await expect(search.getByTestId("calibration-progress")).toHaveJSProperty("value", 1);
  const expected = calibrateTwoArm(design, { thetaTGrid: [0.85, 0.9, 0.95], thetaLGrid: [0, 0.05, 0.1], thetaUGrid: [0.97, 0.99], typeIErrorLimit: 0.2, powerTarget: 0.5, keep: 30 });
  expect(expected.best.length).toBeGreaterThan(0);
  await expect(search.getByText(`${expected.evaluated} of ${expected.total} threshold sets evaluated · ${expected.feasible} meet both targets`)).toBeVisible();

  // The chart comes first, titled, with its axes in words and units.
  const chart = search.getByRole("figure", { name: SEARCH_WORDS.cloudTitle });
  // Its title is visible in the chart frame (components/charts/chart-figure.tsx), with a summary and the numbers.
  await expect(chart.locator("[data-chart-title]")).toHaveText(SEARCH_WORDS.cloudTitle);
  await expect(chart.locator("[data-chart-summary]")).toContainText(`${expected.evaluated} threshold sets give`);
  await expect(chart.locator("[data-chart-summary]")).toContainText(`${expected.feasible} threshold sets meet both`);
  expect(await chart.locator("[data-chart-numbers] tbody tr").count()).toBeGreaterThan(0);
  await expect(chart.locator(".xtitle")).toHaveText("Type I error, largest on the null boundary (probability, 0 to 1)");
  await expect(chart.locator(".ytitle")).toHaveText("Power at the alternative (probability, 0 to 1)");

  // The table: one row per group of identical operating characteristics, the engine's best first.
  const groups = groupByCharacteristics(JSON.parse(JSON.stringify(expected.best)));
  await expect(search.getByTestId("calibration-result")).toHaveCount(groups.length);
  const first = search.getByTestId("calibration-result").first();
  await expect(first.locator("td").nth(1)).toHaveText(formatProbability(groups[0].design.typeIError));
  await expect(first.locator("td").nth(2)).toHaveText(formatProbability(groups[0].design.power));
  await expect(first.locator("td").nth(3)).toHaveText(groups[0].design.expectedSampleSizeNull.toFixed(1));

  // Apply the best design: the form takes its thresholds and the live preview agrees with the engine.
  const chosen = groups[0].thresholds[0];
  await first.getByRole("button", { name: /Use this design/ }).first().click();
  await expect(page.getByLabel(/Final success threshold θT|^Final success bar(\s*θT)?$/).first()).toHaveValue(String(chosen.thetaT));
  const applied = twoArmTypeIErrorAndPower({ ...design, rule: { ...design.rule, thetaT: chosen.thetaT, futilityThreshold: chosen.thetaL, efficacyThreshold: chosen.thetaU } });
  await expect(page.getByTestId("preview-status")).toHaveText("up to date", { timeout: 60_000 });
  await expect(page.getByTestId("oc-type-i-error")).toHaveText(formatProbability(applied.typeIError));
  await expect(page.getByTestId("oc-power")).toHaveText(formatProbability(applied.power));
});
