/**
 * The authorization matrix (tests/e2e/support/authorization-matrix.ts), cell by cell, on the
 * single-arm demo trial (CRN-201), the two-arm demo trial (CRN-305) and the matrix's own fixture
 * trial (matrix-fixture.ts, numbers unlike the demo's): each role requests every page, route
 * method and server action and gets the expected answer; for the blinded roles the body, and for
 * pages also the React Server Component payload (RSC: 1), must hold no closed data. Positive
 * controls show the markers do appear for the DMC member, so a leak would be caught.
 *
 * Fast on purpose: one APIRequestContext per role (no page rendering), signed in through
 * next-auth's credentials endpoint, one test per row and trial with soft checks per role.
 * Writes are requested with invalid bodies or empty forms, so nothing changes.
 */
import { expect, test, request as playwrightRequest, type APIRequestContext, type APIResponse } from "@playwright/test";
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { ACCOUNTS, credentialsSignIn } from "./support/accounts";
import { ACTION_REFUSAL, AUTHORIZATION_MATRIX, BLINDED_ROLES, ROLES, findOutcomeData, type MatrixRole, type MatrixRow } from "./support/authorization-matrix";
import { FIXTURE_CLOSED, OUTSIDER } from "./support/matrix-fixture-data";
import { fillPath, matrixIds, type MatrixIds, type TrialIds, type TrialKey } from "./support/matrix-ids";

const TRIAL_KEYS: TrialKey[] = ["single", "two", "fixture"];
const ROOT = path.resolve(import.meta.dirname, "../..");
// The fixture is made once per run, before any test (support/global-setup.ts); read in the tests, not here.
let ids: MatrixIds;

/** Server action ids by "file#export", from the build's manifest (the same ids the pages' forms post). */
function actionIds(): Map<string, string> {
  const dist = process.env.NEXT_DIST_DIR || ".next";
  const manifest = JSON.parse(readFileSync(path.join(ROOT, dist, "server", "server-reference-manifest.json"), "utf8")) as { node: Record<string, { filename?: string; exportedName?: string; workers?: Record<string, unknown> }> };
  const out = new Map<string, string>();
  for (const [id, entry] of Object.entries(manifest.node)) {
    if (entry.filename && entry.exportedName) out.set(`${entry.filename.replace(/^\.\//, "")}#${entry.exportedName}`, id);
  }
  return out;
}

// React's own client-side encoding of action arguments, as the browser sends them: (previous state, form).
const { encodeReply } = createRequire(import.meta.url)("next/dist/compiled/react-server-dom-webpack/client.node.js") as { encodeReply: (v: unknown) => Promise<FormData | string> };

const contexts = new Map<MatrixRole, APIRequestContext>();
let actions = new Map<string, string>();

async function signedInContext(baseURL: string, email: string, password: string): Promise<APIRequestContext> {
  const ctx = await playwrightRequest.newContext({ baseURL });
  expect(await credentialsSignIn(ctx, email, password), `sign-in of ${email}`).toBeNull();
  return ctx;
}

async function contextOf(baseURL: string, role: MatrixRole): Promise<APIRequestContext> {
  if (role === "anonymous") return playwrightRequest.newContext({ baseURL });
  const who = role === "outsider" ? OUTSIDER : ACCOUNTS[role];
  return signedInContext(baseURL, who.email, who.password);
}

/** Whether an answer to a signed-in role says the session is gone. */
async function sessionEnded(res: APIResponse): Promise<boolean> {
  if (res.status() === 401) return true;
  if (res.status() >= 300 && res.status() < 400) return /\/signin(\?|$)/.test(res.headers()["location"] ?? "");
  return res.status() === 200 && /Sign in to continue/.test(await res.text());
}

test.beforeAll(async ({ baseURL }) => {
  test.setTimeout(180_000);
  ids = matrixIds();
  actions = actionIds();
  for (const role of ROLES) contexts.set(role, await contextOf(baseURL!, role));
});

test.afterAll(async () => {
  for (const c of contexts.values()) await c.dispose();
});

async function requestCell(row: MatrixRow, url: string, ctx: APIRequestContext, t: TrialIds | undefined) {
  if (row.kind === "action") {
    const id = actions.get(row.action!);
    expect(id, `action id of ${row.action} in the build manifest`).toBeTruthy();
    const form = new FormData();
    for (const [k, v] of Object.entries(row.form ?? {})) form.set(k, fillPath(v, t) ?? "");
    const encoded = await encodeReply([undefined, form]);
    // Field order matters (the root field "0" comes last, after the form's fields, as a browser sends it):
    // pass the FormData itself, since a plain object would put the integer key "0" first.
    const multipart = typeof encoded === "string" ? { "0": encoded } : encoded;
    return ctx.post(url, { multipart, maxRedirects: 0, headers: { "Next-Action": id!, Accept: "text/x-component" } });
  }
  const options = { maxRedirects: 0, ...(row.body === undefined ? {} : typeof row.body === "string" ? { data: row.body, headers: { "Content-Type": row.contentType ?? "text/plain" } } : { data: row.body, headers: { "Content-Type": "application/json" } }) };
  return ctx.fetch(url, { method: row.method, ...options });
}

for (const row of AUTHORIZATION_MATRIX) {
  const trialScoped = row.path.includes("{trial}") || Object.values(row.form ?? {}).some((v) => v.includes("{trial}"));
  for (const key of trialScoped ? TRIAL_KEYS : [undefined]) {
    const label = `${row.kind === "action" ? `action ${row.action!.split("#")[1]} via ${row.path}` : `${row.method} ${row.path}`}${key ? ` on ${key === "single" ? "CRN-201" : key === "two" ? "CRN-305" : "the fixture trial"}` : ""}`;
    test(label, async ({ baseURL }) => {
      test.fixme(!!row.pending, "This page or route is not built yet.");
      const t = key ? ids[key] : undefined;
      const url = fillPath(row.path, t);
      // Meeting and packet placeholders exist on the fixture trial only.
      test.skip(url === undefined, "no such record on this trial");
      for (const role of ROLES) {
        const expected = row.expect[role];
        if (expected === null) continue;
        let res = await requestCell(row, url!, contexts.get(role)!, t);
        // A flow that signs this person out (tests/e2e/sign-in.spec.ts) ends every session of theirs, this
        // lane's too (lib/auth/options.ts): seen as a sign-in redirect, a 401 or the action's sign-in
        // refusal where the role was signed in. Sign in again, once, and ask again.
        if (role !== "anonymous" && (await sessionEnded(res))) {
          await contexts.get(role)!.dispose();
          contexts.set(role, await contextOf(baseURL!, role));
          res = await requestCell(row, url!, contexts.get(role)!, t);
        }
        const body = await res.text();
        const where = `${label} as ${role}: ${res.status()} ${body.slice(0, 200)}`;
        if (typeof expected === "number") {
          expect.soft(res.status(), where).toBe(expected);
          // Signed out, a page sends to sign-in, which returns to the page afterwards (lib/auth/return-to.ts).
          if (expected === 307 && role === "anonymous") {
            const location = res.headers()["location"] ?? "";
            const target = location.includes("?") ? new URL(location, "http://x").searchParams.get("callbackUrl") : null;
            expect.soft(location, where).toMatch(/\/signin(\?callbackUrl=[^&#]+)?$/);
            if (target !== null) expect.soft(target, where).toBe(url);
          }
        } else {
          expect.soft(res.status(), where).toBe(200);
          if (expected === "refused") {
            expect.soft(body, where).toMatch(ACTION_REFUSAL);
            // Only the account on no trial may be refused for "not found": for the others that would mean the
            // form never reached the action's role check (a refusal for the wrong reason).
            if (role !== "outsider") expect.soft(body, where).not.toMatch(/was not found/);
          }
          else {
            expect.soft(body, where).not.toMatch(ACTION_REFUSAL);
            expect.soft(body, where).toMatch(/"error"/);
          }
        }
        if (!BLINDED_ROLES.includes(role)) continue;
        expect.soft(findOutcomeData(body), `closed data in ${where}`).toEqual([]);
        if (row.kind === "page") {
          // The React Server Component payload a client-side navigation fetches: same answer, no closed data.
          // Next.js first redirects an RSC request to the same URL with its cache-busting `_rsc` parameter: follow it,
          // and check that what comes back really is the RSC payload (else the marker check would look at nothing).
          const rsc = await contexts.get(role)!.get(url!, { headers: { RSC: "1" }, maxRedirects: 3 });
          const rscBody = await rsc.text();
          if (typeof expected === "number" && expected !== 307) {
            expect.soft(rsc.headers()["content-type"] ?? "", `RSC ${where}`).toContain("text/x-component");
            if (expected === 200) expect.soft(rsc.status(), `RSC ${where}`).toBe(200);
            // A refused page's RSC payload is sent with status 200 and carries the refusal inside (Next.js's
            // forbidden()/notFound() marker), which the client router turns into the 403/404 screen.
            else expect.soft(rsc.status() === expected || rscBody.includes(`NEXT_HTTP_ERROR_FALLBACK;${expected}`), `RSC ${where}: refusal ${expected} in the payload`).toBe(true);
          }
          expect.soft(findOutcomeData(rscBody), `closed data in the RSC payload of ${where}`).toEqual([]);
        }
      }
    });
  }
}

test("every row runs on at least one trial (no row is skipped everywhere)", () => {
  for (const row of AUTHORIZATION_MATRIX) {
    const keys = row.path.includes("{trial}") ? TRIAL_KEYS : [undefined];
    expect(keys.some((k) => fillPath(row.path, k ? ids[k] : undefined) !== undefined), row.path).toBe(true);
  }
});

test("positive control: the markers find the closed data of each trial in what the DMC member receives", async () => {
  const dmc = contexts.get("dmc")!;
  const review = (k: TrialKey) => dmc.get(`/api/trials/${ids[k].trial}/analyses/${ids[k].analysis}/review`).then((r) => r.text());
  const single = await review("single");
  expect(single).toContain('"responders":6');
  expect(findOutcomeData(single)).toEqual(expect.arrayContaining(['key "responders"', 'key "posterior"', 'key "hpd"', 'key "predictiveProbability"']));
  expect(findOutcomeData(await review("two"))).toEqual(expect.arrayContaining(['key "responders"']));
  const fixture = await review("fixture");
  expect(fixture).toContain(`"responders":${FIXTURE_CLOSED.responders}`);
  const html = await (await dmc.get(`/trials/${ids.fixture.trial}/review/${ids.fixture.analysis}`)).text();
  expect(findOutcomeData(html)).toEqual(expect.arrayContaining(['count "31 / 43"', 'key "responders"']));
  const twoHtml = await (await dmc.get(`/trials/${ids.two.trial}/review/${ids.two.analysis}`)).text();
  expect(findOutcomeData(twoHtml).some((m) => m.startsWith("count"))).toBe(true);
  const recs = await (await dmc.get(`/api/trials/${ids.fixture.trial}/analyses/${ids.fixture.analysis}/recommendations`)).text();
  expect(findOutcomeData(recs)).toEqual(expect.arrayContaining(['key "rationale"', "fixture rationale"]));
  // The closed packet is really there for the DMC member (so its 403 for blinded roles is a refusal, not an absence).
  const closed = await dmc.get(`/api/trials/${ids.fixture.trial}/meetings/${ids.fixture.meeting}/packets/${ids.fixture.packetClosed}`);
  expect(closed.status()).toBe(200);
  expect(closed.headers()["content-type"]).toBe("application/pdf");
});

test("positive control: an action call as the pages make it reaches the action (refusal text comes from the action itself)", async () => {
  const sponsor = contexts.get("sponsor")!;
  const row = AUTHORIZATION_MATRIX.find((r) => r.action?.endsWith("#scheduleMeeting"))!;
  const res = await requestCell(row, `/trials/${ids.fixture.trial}/meetings`, sponsor, ids.fixture);
  expect(await res.text()).toMatch(/Your role on this trial does not allow/);
  // A made-up action id is not an action: Next.js does not answer with an action's state.
  const bogus = await sponsor.post(`/trials/${ids.fixture.trial}/meetings`, { multipart: { "0": '["$undefined"]' }, headers: { "Next-Action": "00".repeat(21) }, maxRedirects: 0 });
  expect(await bogus.text()).not.toMatch(ACTION_REFUSAL);
});
