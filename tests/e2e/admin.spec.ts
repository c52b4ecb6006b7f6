import { expect, test } from "@playwright/test";
import { signIn } from "./support/accounts";

test("the administrator creates an account without ever choosing its password; the owner sets it through the one-time link", async ({ page, browser }) => {
  // Three browser contexts and a dozen page loads: more than the default budget on a busy machine.
  test.slow();
  await signIn(page, "admin");
  await page.goto("/admin");
  const form = page.getByRole("form", { name: "Create an account" });
  const accounts = page.getByRole("table", { name: "Accounts" });
  // count() does not wait: read it once the table is on the page.
  await expect(accounts.getByRole("row").first()).toBeVisible();
  const before = await accounts.getByRole("row").count();

  // No password field for the administrator to fill.
  await expect(form.getByLabel(/password/i)).toHaveCount(0);
  // Empty form
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(form.getByText("Enter the person's name.")).toHaveCount(2); // at the top of the form and beside the field
  // Duplicate e-mail
  await form.getByLabel("Name").fill("Another Sponsor");
  await form.getByLabel("E-mail").fill("sponsor@cairn.example");
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(form.getByText("An account with this e-mail address already exists.")).toHaveCount(2); // at the top of the form and beside the field
  await page.reload();
  await expect(accounts.getByRole("row")).toHaveCount(before);

  // Good input: the link is shown once (and e-mailed).
  const email = `noor.abendroth.${Date.now()}@cairn.example`;
  await form.getByLabel("Name").fill("Noor Abendroth");
  await form.getByLabel("E-mail").fill(email);
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(page.getByText("Account created for Noor Abendroth.")).toBeVisible();
  const link = (await page.getByTestId("password-link").locator("p.font-mono").textContent())!.trim();
  expect(link).toMatch(/\/set-password#[A-Za-z0-9_-]{43}$/);
  await expect(accounts.getByRole("row")).toHaveCount(before + 1);

  // The owner, in their own browser, sets the password; bad input first.
  const ownerCtx = await browser.newContext();
  const owner = await ownerCtx.newPage();
  await owner.goto(link);
  await expect(owner).toHaveURL(/\/set-password$/); // the token leaves the address bar once read
  const setForm = owner.getByRole("form", { name: "Set your password" });
  await setForm.getByLabel("New password", { exact: true }).fill("short");
  await setForm.getByLabel("New password again").fill("short");
  await setForm.getByRole("button", { name: "Set password" }).click();
  await expect(setForm.getByText("The password must be at least 12 characters.")).toHaveCount(2); // at the top of the form and beside the field
  await setForm.getByLabel("New password", { exact: true }).fill("noor-chose-this-one");
  await setForm.getByLabel("New password again").fill("noor-chose-this-one");
  await setForm.getByRole("button", { name: "Set password" }).click();
  await expect(owner.getByText("Your password is set.")).toBeVisible();
  await owner.goto("/signin");
  await owner.getByLabel("E-mail").fill(email);
  await owner.getByLabel("Password").fill("noor-chose-this-one");
  await owner.getByRole("button", { name: "Sign in" }).click();
  await expect(owner.getByTestId("signed-in-as")).toHaveText("Noor Abendroth");

  // The link does not work a second time.
  const again = await browser.newContext();
  const replay = await again.newPage();
  await replay.goto(link);
  await replay.getByLabel("New password", { exact: true }).fill("someone-elses-pass");
  await replay.getByLabel("New password again").fill("someone-elses-pass");
  await replay.getByRole("button", { name: "Set password" }).click();
  await expect(replay.getByText(/This set-password link is not valid/)).toBeVisible();
  await again.close();

  // Deactivation ends the owner's open session at once.
  await page.reload();
  const row = accounts.getByRole("row").filter({ hasText: email });
  await row.getByRole("button", { name: "Deactivate Noor Abendroth" }).click();
  await expect(page.getByText("Noor Abendroth is deactivated and signed out everywhere.")).toBeVisible();
  expect((await owner.request.get("/api/trials/1/open-status")).status()).toBe(401);
  await owner.goto("/trials");
  await expect(owner).toHaveURL(/\/signin$/);
  await ownerCtx.close();
});

test("the administrator cannot give themselves an unblinded role, and a sponsor cannot also sit on the DMC", async ({ page }) => {
  test.slow();
  await signIn(page, "admin");
  await page.goto("/admin");
  const give = page.getByRole("form", { name: "Give a role on a trial" });
  await give.getByLabel("Person").selectOption({ label: "Olu Haddad <admin@cairn.example>" });
  await give.getByLabel("Trial").selectOption({ index: 1 });
  await give.getByLabel("Role").selectOption("dmc_member");
  await give.getByRole("button", { name: "Give role" }).click();
  await expect(give.getByText(/A second administrator must give it to you/)).toHaveCount(2); // at the top of the form and beside the field

  // The form starts afresh after each answer: choose all three again.
  await give.getByLabel("Person").selectOption({ label: "Mara Vell <sponsor@cairn.example>" });
  await give.getByLabel("Trial").selectOption({ index: 1 });
  await give.getByLabel("Role").selectOption("dmc_member");
  await give.getByRole("button", { name: "Give role" }).click();
  await expect(give.getByText(/blinded and unblinded sides of a trial are held by different people/)).toHaveCount(2); // at the top of the form and beside the field
});

test("a signed-in person changes their own password on the account page", async ({ page }) => {
  await signIn(page, "dmc");
  await page.getByTestId("signed-in-as").click();
  await expect(page).toHaveURL(/\/account$/);
  const form = page.getByRole("form", { name: "Change your password" });
  await form.getByLabel("Current password").fill("not-my-password");
  await form.getByLabel("New password", { exact: true }).fill("a-fresh-password-1");
  await form.getByLabel("New password again").fill("a-fresh-password-1");
  await form.getByRole("button", { name: "Change password" }).click();
  await expect(form.getByText("Your current password is not correct, so nothing was changed.").first()).toBeVisible();
  await form.getByLabel("New password", { exact: true }).fill("short");
  await form.getByLabel("New password again").fill("short");
  await form.getByRole("button", { name: "Change password" }).click();
  await expect(form.getByText("The password must be at least 12 characters.")).toHaveCount(2); // at the top of the form and beside the field
});

test("a non-administrator cannot open the administration page", async ({ page }) => {
  await signIn(page, "statistician");
  const res = await page.goto("/admin");
  expect(res?.status()).toBe(403);
  await expect(page.getByRole("heading", { name: "Not available to your role" })).toBeVisible();
});
