/**
 * Keyboard use (WCAG 2.1.1, 2.4.3, 2.4.7, 3.3.1), by keyboard only once a page is open:
 * - the closed review: fewer than 40 Tab stops from the top of the page to the recommendation form;
 * - a data grid is one Tab stop (Tab enters, arrow keys move inside, the next Tab leaves; Shift+Tab
 *   likewise backwards) with a 3 px focus ring on the focused header;
 * - every control of the design form and of the recommendation form is reached with Tab and works
 *   with the keyboard, and a refused submit moves focus to the first field to fix;
 * - a locked design's values are reachable (read-only fields, not a disabled fieldset).
 * Changes demo data only by creating its own trial (unique code); the recommendation form is
 * submitted empty, which records nothing.
 */
import { expect, test, type Locator, type Page } from "@playwright/test";
import { signIn } from "./support/accounts";

const suffix = `${Date.now() % 1_000_000}`;

async function settle(page: Page) {
  await page.waitForLoadState("networkidle");
  await expect(page.getByText(/^(Drawing chart…|Loading the table…)$/)).toHaveCount(0, { timeout: 60_000 });
}

/** Whether the focused element is inside `scope`. */
const focusInside = (scope: Locator) => scope.evaluate((el) => el.contains(document.activeElement));

/** A short description of the focused element, for messages. */
const focusedName = (page: Page) =>
  page.evaluate(() => {
    const el = document.activeElement as HTMLElement | null;
    return el ? `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ""} "${(el.getAttribute("aria-label") ?? el.textContent ?? "").trim().slice(0, 40)}"` : "nothing";
  });

/** A fresh load of the current page, so sequential focus starts at the top of the document. */
async function focusTop(page: Page) {
  await page.goto(page.url());
  await settle(page);
  expect(await page.evaluate(() => document.activeElement === document.body)).toBe(true);
}

async function openDemoReview(page: Page, code: string) {
  await page.goto("/trials");
  await page.getByRole("link", { name: code, exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/, { timeout: 60_000 });
  await page.getByRole("link", { name: "Closed review" }).click();
  await page.getByRole("link", { name: /^Open look \d+$/ }).first().click();
  await expect(page).toHaveURL(/\/review\/\d+$/, { timeout: 60_000 });
  await settle(page);
}

test("the closed review: fewer than 40 Tab stops from the top to the recommendation form, a grid crossed with one Tab", async ({ page }) => {
  test.setTimeout(300_000);
  await signIn(page, "dmc");
  await openDemoReview(page, "CRN-201");
  const form = page.getByRole("form", { name: /^Record (the recommendation|a correction)$/ });
  await expect(form).toBeVisible();

  await focusTop(page);
  let stops = 0;
  const visited: string[] = [];
  while (stops < 120 && !(await focusInside(form))) {
    await page.keyboard.press("Tab");
    stops++;
    visited.push(await focusedName(page));
  }
  expect(await focusInside(form), `never reached the form; visited:\n${visited.join("\n")}`).toBe(true);
  console.log(`closed review: ${stops} Tab stops from the top to the recommendation form:\n${visited.join("\n")}`);
  expect(stops, `Tab stops before the recommendation form:\n${visited.join("\n")}`).toBeLessThan(40);

  // The boundary grid: one Tab in, arrows inside, one Tab out; and back again with Shift+Tab.
  const grid = page.getByRole("region", { name: "Boundary table" });
  await expect(grid.locator(".ag-header-cell").first()).toBeVisible({ timeout: 60_000 });
  // The Export CSV button of this grid is the control just before it.
  const exportBefore = grid.locator("xpath=preceding::button[normalize-space()='Export CSV'][1]");
  await exportBefore.focus();
  await page.keyboard.press("Tab");
  expect(await focusInside(grid), `Tab from Export CSV should enter the grid, focus is on ${await focusedName(page)}`).toBe(true);
  const entered = await focusedName(page);
  // The focused header has the 3 px ring.
  const ring = await page.evaluate(() => {
    const s = getComputedStyle(document.activeElement as Element);
    return { width: s.outlineWidth, style: s.outlineStyle };
  });
  expect(ring).toEqual({ width: "3px", style: "solid" });
  await page.keyboard.press("ArrowRight");
  expect(await focusInside(grid)).toBe(true);
  expect(await focusedName(page)).not.toBe(entered);
  await page.keyboard.press("ArrowDown");
  expect(await focusInside(grid), "ArrowDown stays inside the grid").toBe(true);
  await page.keyboard.press("Tab");
  expect(await focusInside(grid), `one Tab should leave the grid, focus is on ${await focusedName(page)}`).toBe(false);
  const after = await focusedName(page);
  expect(after).not.toBe("nothing");
  await page.keyboard.press("Shift+Tab");
  expect(await focusInside(grid), `Shift+Tab from ${after} should come back into the grid`).toBe(true);
  await page.keyboard.press("Shift+Tab");
  expect(await focusInside(grid), `one Shift+Tab should leave the grid backwards, focus is on ${await focusedName(page)}`).toBe(false);
  await expect(exportBefore).toBeFocused();
});

test("the recommendation form works by keyboard; an empty submit moves focus to the first field to fix", async ({ page }) => {
  test.setTimeout(300_000);
  await signIn(page, "dmc");
  await openDemoReview(page, "CRN-201");
  const form = page.getByRole("form", { name: /^Record (the recommendation|a correction)$/ });
  const decision = form.getByLabel("Committee's recommendation");
  const rationale = form.getByLabel("Rationale");
  const password = form.getByLabel(/^Password \(electronic signature\): recommendation recorded/);
  const submit = form.getByRole("button", { name: /^Sign and record/ });

  // Every control is reached with Tab, in order.
  await decision.focus();
  const reached: string[] = [await focusedName(page)];
  for (let i = 0; i < 3; i++) {
    await page.keyboard.press("Tab");
    reached.push(await focusedName(page));
  }
  await expect(submit).toBeFocused();
  expect(reached.join("\n")).toMatch(/select#decision[\s\S]*textarea#rationale[\s\S]*input#password[\s\S]*button/);

  // An empty submit (Enter on the button): refused, nothing recorded, focus on the first field to fix.
  await page.keyboard.press("Enter");
  await expect(form.locator("#decision-error")).not.toBeEmpty({ timeout: 60_000 });
  await expect(decision).toBeFocused();

  // Operable: choose with the arrow keys, type, and the values are there.
  await page.keyboard.press("ArrowDown");
  await expect(decision).not.toHaveValue("");
  await page.keyboard.press("Tab");
  await expect(rationale).toBeFocused();
  await page.keyboard.type("Typed by keyboard only.");
  await expect(rationale).toHaveValue("Typed by keyboard only.");
  await page.keyboard.press("Tab");
  await expect(password).toBeFocused();
  await page.keyboard.type("x");
  await expect(password).toHaveValue("x");
});

test("every control of the design form is reached with Tab and works by keyboard; a refused save focuses the first field to fix", async ({ page }) => {
  test.setTimeout(300_000);
  await signIn(page, "statistician");
  // A trial of its own, so the design is a new, editable draft.
  await page.goto("/trials/new");
  const newTrial = page.getByRole("form", { name: "New trial" });
  // The empty form by keyboard: refused, focus on the first field to fix.
  await newTrial.getByRole("button", { name: "Create trial" }).focus();
  await page.keyboard.press("Enter");
  await expect(newTrial.getByText("Enter a title.", { exact: true })).toBeVisible({ timeout: 60_000 });
  await expect(newTrial.locator('[aria-invalid="true"]').first()).toBeFocused();
  await newTrial.getByLabel("Trial code").fill(`E2E-K-${suffix}`);
  await newTrial.getByLabel("Title").fill(`Invented keyboard study E2E-K-${suffix}`);
  await newTrial.getByLabel("Sponsor").fill("Brackenfold Biologics (invented)");
  await newTrial.getByLabel("Arm label").fill("BRK-11");
  await newTrial.getByLabel("Endpoint", { exact: true }).fill("Objective response at week 12");
  await newTrial.getByLabel("Target enrolment").fill("40");
  await newTrial.getByRole("button", { name: "Create trial" }).click();
  await expect(page).toHaveURL(/\/trials\/\d+\/design$/, { timeout: 60_000 });

  const settings = page.getByRole("group", { name: "Design settings" });
  await expect(settings).toBeVisible();
  // Every control, as the page has it; radios of one group share one Tab stop.
  const controls = await settings.evaluate((el) =>
    [...el.querySelectorAll<HTMLElement>("input, select, textarea")]
      .filter((c) => c.getClientRects().length > 0)
      .map((c) => (c instanceof HTMLInputElement && c.type === "radio" ? `radio:${c.name}` : c.id || c.getAttribute("name") || c.outerHTML.slice(0, 60))),
  );
  expect(controls.length).toBeGreaterThan(8);
  const first = settings.locator("input, select, textarea").first();
  await first.focus();
  const reached = new Set<string>();
  for (let i = 0; i < 80 && (await focusInside(settings)); i++) {
    reached.add(
      await page.evaluate(() => {
        const c = document.activeElement as HTMLInputElement;
        return c.type === "radio" ? `radio:${c.name}` : c.id || c.getAttribute("name") || c.outerHTML.slice(0, 60);
      }),
    );
    await page.keyboard.press("Tab");
  }
  expect([...new Set(controls)].filter((c) => !reached.has(c)), "controls never reached with Tab").toEqual([]);

  // Operable by keyboard: a select with the arrow keys, a checkbox with Space, a radio group with the arrows, text by typing.
  const family = settings.getByLabel(/Prior on the response rate/);
  const familyBefore = await family.inputValue();
  await family.focus();
  await page.keyboard.press("ArrowDown");
  await expect(family).not.toHaveValue(familyBefore);
  const efficacy = settings.getByLabel("Stop early for efficacy");
  const wasChecked = await efficacy.isChecked();
  await efficacy.focus();
  await page.keyboard.press("Space");
  await expect(efficacy).toBeChecked({ checked: !wasChecked });
  const listRadio = settings.getByLabel("A list of enrolled counts");
  const everyRadio = settings.getByLabel("Every k patients");
  const listWasChecked = await listRadio.isChecked();
  await (listWasChecked ? listRadio : everyRadio).focus();
  await page.keyboard.press("ArrowRight");
  await expect(listWasChecked ? everyRadio : listRadio).toBeChecked();
  const p0 = settings.getByLabel("p0, uninteresting rate");
  await p0.focus();
  await page.keyboard.press("ControlOrMeta+a");
  await page.keyboard.type("abc");
  await expect(p0).toHaveValue("abc");

  // Save by keyboard with p0 invalid: refused, and focus goes to p0.
  await page.getByRole("button", { name: "Save draft" }).focus();
  await page.keyboard.press("Enter");
  await expect(page.getByText("Check the highlighted fields; nothing was saved.")).toBeVisible();
  await expect(p0).toBeFocused();
});

test("a locked design's values are reachable by keyboard and read-only", async ({ page }) => {
  test.setTimeout(180_000);
  await signIn(page, "sponsor");
  await page.goto("/trials");
  await page.getByRole("link", { name: "CRN-201", exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/, { timeout: 60_000 });
  await page.goto(`${new URL(page.url()).pathname}/design`);
  const settings = page.getByRole("group", { name: "Design settings" });
  await expect(settings).toBeVisible({ timeout: 60_000 });
  expect(await settings.evaluate((el) => (el as HTMLFieldSetElement).disabled)).toBe(false);
  const nMax = settings.getByLabel("Maximum sample size");
  const value = await nMax.inputValue();
  expect(value).not.toBe("");
  await nMax.focus();
  await expect(nMax).toBeFocused();
  await page.keyboard.type("9");
  await expect(nMax).toHaveValue(value);
  await expect(nMax).toHaveAttribute("readonly", "");
  const family = settings.getByLabel(/Prior on the response rate/);
  await expect(family).toHaveAttribute("aria-readonly", "true");
  const before = await family.inputValue();
  await family.focus();
  await page.keyboard.press("ArrowDown");
  await expect(family).toHaveValue(before);
});
