import { expect, type APIRequestContext, type Page } from "@playwright/test";

/** The demo accounts of db/seeds/demo.ts (invented people). */
export const ACCOUNTS = {
  admin: { email: "admin@cairn.example", password: "demo-admin-pass", name: "Olu Haddad" },
  statistician: { email: "statistician@cairn.example", password: "demo-stat-pass", name: "Ines Okafor-Lind" },
  dmc: { email: "dmc@cairn.example", password: "demo-dmc-pass", name: "Dr Rafael Quintero-Vale" },
  sponsor: { email: "sponsor@cairn.example", password: "demo-sponsor-pass", name: "Mara Vell" },
  coordinator: { email: "coordinator@cairn.example", password: "demo-coord-pass", name: "Tomas Brandt-Oye" },
} as const;
export type AccountKey = keyof typeof ACCOUNTS;

export async function signIn(page: Page, who: AccountKey) {
  const a = ACCOUNTS[who];
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(a.email);
  await page.getByLabel("Password").fill(a.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByTestId("signed-in-as")).toHaveText(a.name);
}

/**
 * One sign-in through next-auth's credentials endpoint, as the sign-in form posts it, on a request
 * context (its cookies are then signed in). Returns the error the form would show, or null.
 */
export async function credentialsSignIn(request: APIRequestContext, email: string, password: string, headers?: Record<string, string>): Promise<string | null> {
  const { csrfToken } = (await (await request.get("/api/auth/csrf")).json()) as { csrfToken: string };
  const res = await request.post("/api/auth/callback/credentials", { headers, form: { email, password, csrfToken, json: "true", callbackUrl: "/trials" }, maxRedirects: 0 });
  const { url } = (await res.json()) as { url: string };
  return new URL(url, "http://localhost").searchParams.get("error");
}
