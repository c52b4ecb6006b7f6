/**
 * The closed review offers its reproduction script: a DMC member opens a locked look of CRN-305 and
 * downloads the R script from the link on the page; the file starts with the script's header and
 * carries the look's stored counts.
 */
import { expect, test } from "@playwright/test";
import { readFileSync } from "node:fs";
import { signIn } from "./support/accounts";
import { REPRODUCTION_SCRIPT_HEADER } from "@/lib/review/reproduction-script";

test.describe.configure({ timeout: 300_000 });

test("the DMC member downloads the R script of a locked look from the closed review", async ({ page }) => {
  await signIn(page, "dmc");
  await page.getByRole("link", { name: "CRN-305", exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/, { timeout: 60_000 });
  await page.getByRole("link", { name: "Closed review" }).click();
  await page.getByRole("link", { name: /^Open look \d+$/ }).first().click();
  await expect(page.getByRole("heading", { name: /^Interim analysis, look \d+$/ })).toBeVisible({ timeout: 60_000 });

  const link = page.getByRole("link", { name: "Download R script" });
  await expect(link).toBeVisible();
  const [download] = await Promise.all([page.waitForEvent("download"), link.click()]);
  expect(download.suggestedFilename()).toMatch(/^CRN-305-look-\d+-reproduction\.R$/);
  const text = readFileSync((await download.path())!, "utf8");
  expect(text.startsWith(`${REPRODUCTION_SCRIPT_HEADER}\n# Trial CRN-305, look `)).toBe(true);
  expect(text).toContain("Cairn is decision support; the DMC charter, the protocol and the regulator decide.");
  expect(text).toContain('list(1, "experimental", 20, 20, 9, NA, NA)');
});
