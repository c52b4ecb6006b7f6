import { expect, test } from "@playwright/test";
import { ACCOUNTS, signIn, type AccountKey } from "./support/accounts";

test("an anonymous visitor is sent to the sign-in page, and the API answers 401", async ({ page, request }) => {
  await page.goto("/trials");
  await expect(page).toHaveURL(/\/signin$/);
  const res = await request.get("/api/trials/1/open-status", { maxRedirects: 0 });
  expect(res.status()).toBe(401);
});

test("a wrong password gets a clear message and no session", async ({ page }) => {
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(ACCOUNTS.sponsor.email);
  await page.getByLabel("Password").fill("not-the-password");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("alert").filter({ hasText: "not correct" })).toBeVisible();
  await page.goto("/trials");
  await expect(page).toHaveURL(/\/signin$/);
});

test("empty and malformed input is refused before anything is sent", async ({ page }) => {
  await page.goto("/signin");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByText("Enter your e-mail address.")).toBeVisible();
  await expect(page.getByText("Enter your password.")).toBeVisible();
  await page.getByLabel("E-mail").fill("no-at-sign");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByText("Enter a valid e-mail address.")).toBeVisible();
});

test("a link followed while signed out (an e-mail's meeting link) returns to its page, fragment included, after sign-in", async ({ page }) => {
  await page.goto("/trials/1/meetings?from=mail#packets");
  await expect(page).toHaveURL(/\/signin\?callbackUrl=%2Ftrials%2F1%2Fmeetings%3Ffrom%3Dmail#packets$/);
  await page.getByLabel("E-mail").fill(ACCOUNTS.dmc.email);
  await page.getByLabel("Password").fill(ACCOUNTS.dmc.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page).toHaveURL(/\/trials\/1\/meetings\?from=mail#packets$/);
  await expect(page.getByTestId("signed-in-as")).toHaveText(ACCOUNTS.dmc.name);
});

test("a return target on another site is ignored: sign-in lands on the trial list", async ({ page }) => {
  for (const evil of ["//evil.example/", "/\\evil.example", "https://evil.example/", "/.//evil.example"]) {
    await page.context().clearCookies();
    await page.goto(`/signin?callbackUrl=${encodeURIComponent(evil)}`);
    await page.getByLabel("E-mail").fill(ACCOUNTS.sponsor.email);
    await page.getByLabel("Password").fill(ACCOUNTS.sponsor.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page).toHaveURL(/^http:\/\/localhost:\d+\/trials$/);
  }
});

const EXPECTED_ROLE_BADGE: Record<AccountKey, string | null> = {
  admin: null,
  statistician: "Unblinded statistician",
  dmc: "DMC member",
  sponsor: "Sponsor",
  coordinator: "Trial coordinator",
};

for (const who of Object.keys(ACCOUNTS) as AccountKey[]) {
  test(`${who} signs in, sees both demo trials with the right role, and signs out`, async ({ page }) => {
    await signIn(page, who);
    await expect(page).toHaveURL(/\/trials$/);
    for (const code of ["CRN-201", "CRN-305"]) {
      const roles = page.getByTestId(`roles-${code}`);
      if (EXPECTED_ROLE_BADGE[who]) await expect(roles).toContainText(EXPECTED_ROLE_BADGE[who]!);
      else await expect(roles).toContainText("Administrator (blinded)");
    }
    await page.getByRole("link", { name: "CRN-201" }).click();
    await expect(page.getByTestId("caution")).toContainText("Decision support only");
    // Meetings are reachable from a tab for everyone on the trial (blinded roles see the open part).
    await expect(page.getByRole("navigation", { name: "Trial sections" }).getByRole("link", { name: "Meetings" })).toBeVisible();
    await page.getByRole("button", { name: "Sign out" }).click();
    await expect(page).toHaveURL(/\/signin$/);
    await page.goto("/trials");
    await expect(page).toHaveURL(/\/signin$/);
  });
}

test("a copied session cookie is refused after sign-out", async ({ browser }) => {
  const ownerCtx = await browser.newContext();
  const owner = await ownerCtx.newPage();
  await signIn(owner, "sponsor");
  // Someone copies the session cookie (a shared computer, a stolen backup of the browser profile).
  const thiefCtx = await browser.newContext({ storageState: await ownerCtx.storageState() });
  expect((await thiefCtx.request.get("/api/trials/1/open-status")).status()).toBe(200);
  await owner.getByRole("button", { name: "Sign out" }).click();
  await expect(owner).toHaveURL(/\/signin$/);
  // The copy still carries a validly signed token, but of an ended session version.
  expect((await thiefCtx.request.get("/api/trials/1/open-status")).status()).toBe(401);
  const thief = await thiefCtx.newPage();
  await thief.goto("/trials");
  await expect(thief).toHaveURL(/\/signin$/);
  await ownerCtx.close();
  await thiefCtx.close();
});
