/**
 * The authorization matrix (tests/e2e/support/authorization-matrix.ts), cell by cell: each role
 * requests every page and route and gets the expected status; for the blinded roles (sponsor,
 * coordinator, administrator, anonymous) the body, and for pages also the React Server Component
 * payload, must hold no outcome data of the demo scenario. Positive controls show the markers do
 * appear for the DMC, so a leak would be caught. Read-only: uses the seeded demo data.
 */
import { expect, test, request as playwrightRequest, type APIRequestContext } from "@playwright/test";
import { mkdirSync } from "node:fs";
import path from "node:path";
import { signIn, type AccountKey } from "./support/accounts";
import { AUTHORIZATION_MATRIX, BLINDED_ROLES, ROLES, findOutcomeData, type MatrixRole } from "./support/authorization-matrix";

const ids = { trial: "", analysis: "", arm: "" };
const contexts = new Map<MatrixRole, APIRequestContext>();

function fill(template: string): string {
  return template.replace("{trial}", ids.trial).replace("{analysis}", ids.analysis).replace("{arm}", ids.arm);
}

test.beforeAll(async ({ browser, baseURL }) => {
  // Five sign-ins on a shared two-core machine: more than the default minute.
  test.setTimeout(240_000);
  const dir = path.join(test.info().project.outputDir, "storage-states");
  mkdirSync(dir, { recursive: true });
  for (const role of ROLES) {
    if (role === "anonymous") {
      contexts.set(role, await playwrightRequest.newContext({ baseURL }));
      continue;
    }
    const context = await browser.newContext();
    const page = await context.newPage();
    await signIn(page, role as AccountKey);
    const file = path.join(dir, `${role}.json`);
    await context.storageState({ path: file });
    if (role === "dmc") {
      // Resolve the demo ids the way a DMC member would find them: CRN-201, its locked look 2.
      await page.goto("/trials");
      ids.trial = ((await page.getByRole("link", { name: "CRN-201", exact: true }).getAttribute("href")) ?? "").split("/").pop()!;
      await page.goto(`/trials/${ids.trial}/review`);
      ids.analysis = ((await page.getByRole("link", { name: "Open look 2", exact: true }).getAttribute("href")) ?? "").split("/").pop()!;
      const review = await page.request.get(`/api/trials/${ids.trial}/analyses/${ids.analysis}/review`);
      ids.arm = String((await review.json()).arms[0].armId);
    }
    await context.close();
    contexts.set(role, await playwrightRequest.newContext({ baseURL, storageState: file }));
  }
  expect(ids.trial).toMatch(/^\d+$/);
  expect(ids.analysis).toMatch(/^\d+$/);
  expect(ids.arm).toMatch(/^\d+$/);
});

test.afterAll(async () => {
  for (const c of contexts.values()) await c.dispose();
});

for (const row of AUTHORIZATION_MATRIX) {
  for (const role of ROLES) {
    const expected = row.expect[role];
    if (expected === null) continue;
    test(`${row.method} ${row.path} as ${role} → ${expected}${BLINDED_ROLES.includes(role) ? ", no outcome data" : ""}`, async () => {
      test.fixme(!!row.pending, "This page or route is not built yet.");
      const ctx = contexts.get(role)!;
      const url = fill(row.path);
      const res =
        row.method === "GET"
          ? await ctx.get(url, { maxRedirects: 0 })
          : await ctx.post(url, { data: row.body, maxRedirects: 0, headers: { "Content-Type": "application/json" } });
      const body = await res.text();
      expect(res.status(), `${row.method} ${url} as ${role}: ${body.slice(0, 300)}`).toBe(expected);
      if (expected === 307) expect(res.headers()["location"]).toMatch(/\/signin$/);
      if (!BLINDED_ROLES.includes(role)) return;
      expect(findOutcomeData(body), `outcome data in ${url} as ${role}`).toEqual([]);
      if (row.kind === "page" && expected === 200) {
        // The React Server Component payload a client-side navigation would fetch.
        const rsc = await ctx.get(url, { headers: { RSC: "1" }, maxRedirects: 0 });
        expect(findOutcomeData(await rsc.text()), `outcome data in the RSC payload of ${url} as ${role}`).toEqual([]);
      }
    });
  }
}

test("positive control: the markers find the demo outcome data in what the DMC member receives", async () => {
  const dmc = contexts.get("dmc")!;
  const api = await (await dmc.get(fill("/api/trials/{trial}/analyses/{analysis}/review"))).text();
  expect(api).toContain('"responders":6');
  expect(findOutcomeData(api)).toEqual(expect.arrayContaining(['key "responders"', 'key "posterior"', 'key "hpd"', 'key "predictiveProbability"']));
  const html = await (await dmc.get(fill("/trials/{trial}/review/{analysis}"))).text();
  expect(findOutcomeData(html)).toEqual(expect.arrayContaining(['count "6 / 20"', 'key "responders"']));
  // The seeded recommendation (look 1) with its closed rationale, as the DMC member receives it.
  const list = await (await dmc.get(fill("/trials/{trial}/review"))).text();
  const look1 = /href="\/trials\/\d+\/review\/(\d+)"[^>]*>Open look 1</.exec(list)?.[1];
  expect(look1).toMatch(/^\d+$/);
  const recs = await (await dmc.get(`/api/trials/${ids.trial}/analyses/${look1}/recommendations`)).text();
  expect(findOutcomeData(recs)).toEqual(expect.arrayContaining(['key "rationale"', "seeded rationale"]));
});

test("the matrix covers every role for every row and every row names a real path", () => {
  for (const row of AUTHORIZATION_MATRIX) {
    expect(Object.keys(row.expect).sort()).toEqual([...ROLES].sort());
    expect(row.path.startsWith("/")).toBe(true);
  }
});
