import { expect, test } from "@playwright/test";
import { signIn } from "./support/accounts";

test("the administrator creates an account; bad input gets field messages and writes nothing", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/admin");
  const form = page.getByRole("form", { name: "Create an account" });
  const accounts = page.getByRole("table", { name: "Accounts" });
  // count() does not wait: read it once the table is on the page.
  await expect(accounts.getByRole("row").first()).toBeVisible();
  const before = await accounts.getByRole("row").count();

  // Empty form
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(form.getByText("Enter the person's name.")).toBeVisible();
  // Duplicate e-mail
  await form.getByLabel("Name").fill("Another Sponsor");
  await form.getByLabel("E-mail").fill("sponsor@cairn.example");
  await form.getByLabel("Initial password").fill("a-very-long-password");
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(form.getByText("An account with this e-mail address already exists.")).toBeVisible();
  // Too short a password
  await form.getByLabel("E-mail").fill("new.person@cairn.example");
  await form.getByLabel("Initial password").fill("short");
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(form.getByText("The password must be at least 12 characters.")).toBeVisible();
  await page.reload();
  await expect(accounts.getByRole("row")).toHaveCount(before);

  // Good input
  await form.getByLabel("Name").fill("Noor Abendroth");
  await form.getByLabel("E-mail").fill("noor.abendroth@cairn.example");
  await form.getByLabel("Initial password").fill("a-very-long-password");
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(page.getByText("Account created for Noor Abendroth.")).toBeVisible();
  await expect(accounts.getByRole("row")).toHaveCount(before + 1);
});

test("a non-administrator cannot open the administration page", async ({ page }) => {
  await signIn(page, "statistician");
  const res = await page.goto("/admin");
  expect(res?.status()).toBe(403);
  await expect(page.getByRole("heading", { name: "Not available to your role" })).toBeVisible();
});
