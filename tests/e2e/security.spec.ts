/**
 * Attacks a browser can make: HTML in names shown as text, security headers, cookie flags, a
 * tampered session, cross-site writes to the API, a removed role taking effect at once, and
 * password guessing (sign-in throttled per account and per address).
 */
import { expect, test, type APIRequestContext } from "@playwright/test";
import { ACCOUNTS, credentialsSignIn, signIn } from "./support/accounts";

/**
 * One sign-in attempt through next-auth's credentials callback, from a given client address
 * (documentation range 203.0.113.0/24, so no other test shares its counter). Returns the error
 * the sign-in form would show, or null when the attempt signed in.
 */
function attemptSignIn(request: APIRequestContext, address: string, email: string, password: string): Promise<string | null> {
  return credentialsSignIn(request, email, password, { "x-forwarded-for": address });
}

const HOSTILE = `<img src=x onerror="window.__pwned=1">Trial "quoted" & <b>bold</b>`;

test("HTML typed into a trial title and arm label is shown as text, never run", async ({ page }) => {
  let dialogs = 0;
  page.on("dialog", async (d) => {
    dialogs++;
    await d.dismiss();
  });
  await signIn(page, "statistician");
  await page.goto("/trials/new");
  await page.getByLabel("Trial code").fill(`SEC-${Date.now() % 100000}`);
  await page.getByLabel("Title").fill(HOSTILE);
  await page.getByLabel("Sponsor").fill("<script>alert(1)</script> Invented sponsor");
  await page.getByLabel("Arm label").fill("<svg onload=alert(2)>");
  await page.getByLabel("Endpoint", { exact: true }).fill("Response");
  await page.getByLabel("Target enrolment").fill("40");
  await page.getByRole("button", { name: /create/i }).click();
  await expect(page).toHaveURL(/\/trials\/\d+\/design/);
  await expect(page.getByRole("heading", { level: 1, name: HOSTILE })).toBeVisible();
  expect(await page.evaluate(() => (window as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
  await page.goto("/trials");
  await expect(page.getByText(HOSTILE)).toBeVisible();
  expect(dialogs).toBe(0);
});

test("responses carry the security headers", async ({ request }) => {
  const res = await request.get("/signin");
  const h = res.headers();
  expect(h["content-security-policy"]).toContain("frame-ancestors 'none'");
  expect(h["content-security-policy"]).not.toContain("unsafe-eval");
  expect(h["x-content-type-options"]).toBe("nosniff");
  expect(h["referrer-policy"]).toBe("same-origin");
  expect(h["x-powered-by"]).toBeUndefined();
});

test("the session cookie is httpOnly and SameSite; a tampered or missing one is refused", async ({ page, context }) => {
  await signIn(page, "sponsor");
  const cookies = await context.cookies();
  const session = cookies.find((c) => c.name.includes("session-token"));
  expect(session).toBeDefined();
  expect(session!.httpOnly).toBe(true);
  expect(session!.sameSite).toBe("Lax");
  // Flip characters in the signed token: the server must not accept it.
  const tampered = session!.value.slice(0, -6) + (session!.value.endsWith("AAAAAA") ? "BBBBBB" : "AAAAAA");
  await context.addCookies([{ ...session!, value: tampered }]);
  await page.goto("/trials");
  await expect(page).toHaveURL(/\/signin$/);
  const api = await page.request.get("/api/trials/1/open-status");
  expect(api.status()).toBe(401);
});

test("a cross-site write to the API is refused before it reaches the route", async ({ page }) => {
  await signIn(page, "dmc");
  const res = await page.request.post("/api/trials/1/analyses/1/recommendations", {
    headers: { origin: "https://elsewhere.example", "content-type": "application/json" },
    data: { decision: "stop_efficacy", rationale: "Cross-site attempt, must be refused.", password: "demo-dmc-pass" },
  });
  expect(res.status()).toBe(403);
  expect(await res.text()).toContain("Cross-site");
});

test("removing the last unblinded statistician of a trial is refused on the admin page, and the role stays", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/admin");
  const row = page.getByRole("row").filter({ hasText: "CRN-201" }).filter({ hasText: "statistician@cairn.example" }).filter({ hasText: "Unblinded statistician" });
  await row.getByRole("button", { name: /^Remove/ }).click();
  await row.getByRole("button", { name: "Yes, remove the role" }).click();
  await expect(row.getByRole("alert")).toContainText("is the last unblinded statistician on CRN-201");
  await page.reload();
  await expect(page.getByRole("row").filter({ hasText: "CRN-201" }).filter({ hasText: "statistician@cairn.example" }).filter({ hasText: "Unblinded statistician" })).toHaveCount(1);
});

test("a person removed from a trial loses access at the next request", async ({ browser }) => {
  const adminCtx = await browser.newContext();
  const admin = await adminCtx.newPage();
  await signIn(admin, "admin");
  const personCtx = await browser.newContext();
  const person = await personCtx.newPage();
  await signIn(person, "coordinator");
  expect((await person.request.get("/api/trials/2/open-status")).status()).toBe(200);

  await admin.goto("/admin");
  const row = admin.getByRole("row").filter({ hasText: "CRN-305" }).filter({ hasText: "coordinator@cairn.example" });
  await row.getByRole("button", { name: /^Remove/ }).click();
  // Removing asks first; nothing changes until the removal is confirmed.
  expect((await person.request.get("/api/trials/2/open-status")).status()).toBe(200);
  await row.getByRole("button", { name: "Yes, remove the role" }).click();
  await expect(row).toHaveCount(0);
  expect((await person.request.get("/api/trials/2/open-status")).status()).toBe(404);
  // Put the role back for the specs that run after this one.
  const give = admin.getByRole("form", { name: "Give a role on a trial" });
  await give.getByLabel("Person").selectOption({ label: "Tomas Brandt-Oye <coordinator@cairn.example>" });
  await give.getByLabel("Trial").selectOption({ label: "CRN-305: TLM-417 plus standard care versus standard care alone: a randomised phase II study" });
  await give.getByLabel("Role").selectOption("coordinator");
  await give.getByRole("button", { name: "Give role" }).click();
  await expect(admin.getByText(/is now coordinator on CRN-305/)).toBeVisible();
  expect((await person.request.get("/api/trials/2/open-status")).status()).toBe(200);
  await adminCtx.close();
  await personCtx.close();
});

test("password guessing slows the guesser, never locks the owner out, and an address spraying accounts is stopped", async ({ playwright, baseURL }) => {
  const request = await playwright.request.newContext({ baseURL });
  // Per (account, address): three wrong passwords cost nothing, the fourth starts a growing delay...
  const account = ACCOUNTS.sponsor;
  for (let i = 0; i < 4; i++) expect(await attemptSignIn(request, "203.0.113.10", account.email, `wrong-${i}`)).toBe("CredentialsSignin");
  expect(await attemptSignIn(request, "203.0.113.10", account.email, account.password)).toMatch(/^Too many failed sign-in attempts\. Try again in \d+ seconds?\.$/);
  // ...while the owner, from their own address, signs in at once: no lock-out.
  expect(await attemptSignIn(request, "203.0.113.11", account.email, account.password)).toBeNull();

  // Per address: thirty failures on thirty accounts from one address block that address, even for a right password...
  for (let i = 0; i < 30; i++) expect(await attemptSignIn(request, "203.0.113.20", `spray-${i}-${Date.now()}@cairn.example`, "wrong")).toBe("CredentialsSignin");
  expect(await attemptSignIn(request, "203.0.113.20", ACCOUNTS.coordinator.email, ACCOUNTS.coordinator.password)).toMatch(/^Too many failed sign-in attempts/);
  // ...while the same account from another address still signs in.
  expect(await attemptSignIn(request, "203.0.113.21", ACCOUNTS.coordinator.email, ACCOUNTS.coordinator.password)).toBeNull();
  await request.dispose();
});
