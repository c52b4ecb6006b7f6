/**
 * Personal API tokens in the browser: the unblinded statistician makes a token on the account page,
 * copies it once, a machine client (a request context without any cookie) reads the open status with
 * it, then the owner revokes it and the same call is refused.
 * Changes demo data: adds one revoked token to the statistician's account.
 */
import { expect, test } from "@playwright/test";
import { signIn } from "./support/accounts";

test("the statistician makes a token on the account page, a client uses it, and revoking it stops it", async ({ page, playwright, baseURL }) => {
  await signIn(page, "statistician");
  await page.getByRole("link", { name: "CRN-201", exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/, { timeout: 60_000 });
  const trialId = new URL(page.url()).pathname.split("/").pop();

  await page.goto("/account");
  const label = `export job ${Date.now()}`;
  const form = page.getByRole("form", { name: "Make an API token" });
  await form.getByLabel("Trial and role").selectOption({ label: "CRN-201: Unblinded statistician" });
  await form.getByLabel("Name").fill(label);
  await form.getByLabel("Days until it expires").fill("30");
  await form.getByRole("button", { name: "Make token" }).click();
  const shown = page.getByTestId("new-api-token");
  await expect(shown).toHaveText(/^cairn_pat_[A-Za-z0-9_-]{43}$/, { timeout: 60_000 });
  const token = (await shown.textContent())!.trim();
  const row = page.getByTestId("api-token-row").filter({ hasText: label });
  await expect(row).toContainText("active");

  // A machine client: no session cookie, only the token.
  const client = await playwright.request.newContext({ baseURL });
  const ok = await client.get(`/api/trials/${trialId}/open-status`, { headers: { Authorization: `Bearer ${token}` } });
  expect(ok.status()).toBe(200);
  expect((await ok.json()).trial.code).toBe("CRN-201");
  expect((await client.get(`/api/trials/${trialId}/analyses`, { headers: { Authorization: `Bearer ${token}` } })).status()).toBe(200);

  await row.getByRole("button", { name: `Revoke the token ${label}` }).click();
  await expect(row).toContainText("revoked", { timeout: 60_000 });
  await expect(row.getByRole("button", { name: /Revoke/ })).toHaveCount(0);
  const refused = await client.get(`/api/trials/${trialId}/open-status`, { headers: { Authorization: `Bearer ${token}` } });
  expect(refused.status()).toBe(401);
  await client.dispose();
});
