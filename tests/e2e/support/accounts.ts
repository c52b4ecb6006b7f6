import { expect, type Page } from "@playwright/test";

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
