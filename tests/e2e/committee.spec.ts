/**
 * The committee decides as a committee, in the browser, on the demo trial CRN-305 (its look 1 is
 * locked in the seed, and the seed has the committee of three and a meeting on that look, already
 * held): attendance per session, the three signed declarations, three signed votes, the chair's
 * recommendation with tally and dissent, the open and closed minutes approved by the chair, the
 * letter signed and e-mailed to the sponsor (caught by the test mail catcher with the PDF
 * attached). Then the sponsor sees the decision and the letter and is refused the votes, the closed
 * minutes and the tally by page and by API. Bad input (an empty vote, minutes without text, an
 * empty seat form) gets a message and writes nothing.
 */
import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import { simpleParser } from "mailparser";
import { expect, test, type Page } from "@playwright/test";
import { ACCOUNTS, signIn } from "./support/accounts";

test.describe.configure({ mode: "serial" });

/** The committee's other two members (db/seeds/demo.ts; invented people). */
const MEMBERS = {
  dmc2: { email: "dmc2@cairn.example", password: "demo-dmc2-pass", name: "Dr Hanne Sorvik" },
  dmc3: { email: "dmc3@cairn.example", password: "demo-dmc3-pass", name: "Dr Kwame Ashdown-Ries" },
} as const;
const CLOSED_COMMENT = "Closed comment: the control arm's pace deserves a look (invented).";
const CLOSED_MINUTES = "Closed session: the committee reviewed the closed report of look 1 (invented).";
const OPEN_MINUTES = "Open session: accrual and data timeliness reviewed; the sponsor had no questions (invented).";
const DISSENT = "One member preferred a modification of the monitoring plan (invented).";
const MAIL_DIR = `.data/mail-e2e-${Number(process.env.CAIRN_E2E_PORT ?? 3100)}`;

let trialPath = "";
let meetingPath = "";

async function signInMember(page: Page, who: keyof typeof MEMBERS) {
  const a = MEMBERS[who];
  await page.goto("/signin");
  await page.getByLabel("E-mail").fill(a.email);
  await page.getByLabel("Password").fill(a.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByTestId("signed-in-as")).toHaveText(a.name);
}

async function openMeeting(page: Page) {
  await page.goto(meetingPath);
  await expect(page.getByRole("heading", { name: "Committee meeting on look 1" })).toBeVisible();
}

// A successful act re-renders the page without its form (and so without the form's message): the
// checks read the record the page shows instead.
async function declare(page: Page, name: string, password: string) {
  await openMeeting(page);
  const form = page.getByRole("form", { name: "Your declaration" });
  await form.getByLabel("No new conflicts").check();
  await form.getByLabel("Password (electronic signature)").fill(password);
  await form.getByRole("button", { name: "Sign the declaration" }).click();
  await expect(page.getByTestId("declaration-row").filter({ hasText: name })).toContainText("No new conflicts");
}

async function declareAndVote(page: Page, name: string, password: string, vote: string, voteLabel: string) {
  await declare(page, name, password);
  await page.getByTestId("closed-session-link").click();
  const form = page.getByRole("form", { name: "Your vote" });
  await form.getByLabel("Your vote").selectOption(vote);
  await form.getByLabel("Password (electronic signature)").fill(password);
  await form.getByRole("button", { name: "Sign my vote" }).click();
  await expect(page.getByTestId("vote-row").filter({ hasText: name })).toContainText(voteLabel);
}

test("the administrator sees the committee of three with its chair; an empty seat form writes nothing", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/trials");
  await page.getByRole("link", { name: "CRN-305", exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/);
  trialPath = new URL(page.url()).pathname;
  await page.getByRole("link", { name: "Committee", exact: true }).click();
  await expect(page.getByTestId("committee-member")).toHaveCount(4);
  await expect(page.getByTestId("committee-member").filter({ hasText: ACCOUNTS.dmc.name })).toContainText("Chair");
  await expect(page.getByTestId("committee-member").filter({ hasText: ACCOUNTS.statistician.name })).toContainText("does not vote");
  await expect(page.getByTestId("committee-quorum")).toContainText("Quorum: 2 voting members present in the closed session (charter, design version 1)");
  const seat = page.getByRole("form", { name: "Seat a committee member" });
  await seat.getByRole("button", { name: "Seat on the committee" }).click();
  await expect(seat.getByRole("alert")).toContainText("Check 2 fields");
  await page.reload();
  await expect(page.getByTestId("committee-member")).toHaveCount(4);
  await page.getByRole("link", { name: "Sessions, declarations, minutes and letter" }).first().click();
  await expect(page).toHaveURL(/\/meetings\/\d+\/committee$/);
  meetingPath = new URL(page.url()).pathname;
});

test("the coordinator records the open session; the statistician the closed one", async ({ page, browser }) => {
  await signIn(page, "coordinator");
  await openMeeting(page);
  const open = page.getByRole("form", { name: "Open session attendance" });
  for (const who of [ACCOUNTS.dmc.name, MEMBERS.dmc2.name, MEMBERS.dmc3.name, ACCOUNTS.statistician.name, ACCOUNTS.sponsor.name, ACCOUNTS.coordinator.name]) await open.getByRole("checkbox", { name: new RegExp(`^${who} \\(`) }).check();
  await open.getByRole("button", { name: "Record open session attendance" }).click();
  await expect(page.getByText("Attendance of the open session recorded.")).toBeVisible();
  // A blinded organiser is not offered the closed session.
  await expect(page.getByRole("form", { name: "Closed session attendance" })).toHaveCount(0);

  const stat = await browser.newPage();
  await signIn(stat, "statistician");
  await openMeeting(stat);
  await expect(stat.getByTestId("meeting-quorum")).toContainText("not quorate");
  const closed = stat.getByRole("form", { name: "Closed session attendance" });
  for (const who of [ACCOUNTS.dmc.name, MEMBERS.dmc2.name, MEMBERS.dmc3.name, ACCOUNTS.statistician.name]) await closed.getByRole("checkbox", { name: who, exact: true }).check();
  await closed.getByRole("button", { name: "Record closed session attendance" }).click();
  await expect(stat.getByText("Attendance of the closed session recorded.")).toBeVisible();
  await stat.reload();
  await expect(stat.getByTestId("meeting-quorum")).toContainText("3 of 3 voting members present; quorum 2");
  await expect(stat.getByTestId("meeting-quorum")).toContainText("quorate");
  await stat.close();
});

test("the two voting members declare and vote; an empty vote is refused", async ({ page }) => {
  await signInMember(page, "dmc2");
  await openMeeting(page);
  await page.getByTestId("closed-session-link").click();
  await expect(page.getByText("Declare your conflicts of interest")).toBeVisible();
  await declareAndVote(page, MEMBERS.dmc2.name, MEMBERS.dmc2.password, "continue", "Continue as planned");
  await page.context().clearCookies();
  await signInMember(page, "dmc3");
  await declare(page, MEMBERS.dmc3.name, MEMBERS.dmc3.password);
  await page.getByTestId("closed-session-link").click();
  const form = page.getByRole("form", { name: "Your vote" });
  await form.getByLabel("Password (electronic signature)").fill(MEMBERS.dmc3.password);
  await form.getByRole("button", { name: "Sign my vote" }).click();
  await expect(form.getByText(/^Check 1 field/)).toBeVisible();
  await expect(form.getByText("Choose your vote.").first()).toBeVisible();
  await expect(page.getByTestId("vote-row").filter({ hasText: MEMBERS.dmc3.name })).toContainText("not voted");
  await form.getByLabel("Your vote").selectOption("continue_modified");
  await form.getByLabel("Comment (optional)").fill(CLOSED_COMMENT);
  await form.getByRole("button", { name: "Sign my vote" }).click();
  await expect(page.getByTestId("vote-row").filter({ hasText: MEMBERS.dmc3.name })).toContainText("Continue with modification");
  await expect(page.getByTestId("vote-row").filter({ hasText: MEMBERS.dmc3.name })).toContainText(CLOSED_COMMENT);
});

test("the chair votes, records the committee's recommendation, approves the minutes and sends the letter", async ({ page, browser }) => {
  // Several signatures, a PDF and a mail delivery on a shared 2-core machine: more than the default bound.
  test.setTimeout(300_000);
  await signIn(page, "dmc");
  await declareAndVote(page, ACCOUNTS.dmc.name, ACCOUNTS.dmc.password, "continue", "Continue as planned");
  await expect(page.getByTestId("vote-tally")).toHaveText("Tally: Continue as planned: 2 · Continue with modification: 1");
  const rec = page.getByRole("form", { name: "Record the committee's recommendation" });
  await rec.getByLabel("Committee's recommendation").selectOption("continue");
  await rec.getByLabel("Rationale").fill("Closed rationale: the closed results support continuing to look 2 (invented).");
  await rec.getByLabel("Dissent (optional)").fill(DISSENT);
  await rec.getByLabel("Password (electronic signature)").fill(ACCOUNTS.dmc.password);
  await rec.getByRole("button", { name: "Sign for the committee" }).click();
  await expect(page.getByTestId("committee-recommendation").first()).toContainText("Tally: Continue as planned: 2 · Continue with modification: 1 · Dissent: " + DISSENT);

  // The statistician drafts both minutes; minutes without text are refused.
  const stat = await browser.newPage();
  await signIn(stat, "statistician");
  await openMeeting(stat);
  const openDraft = stat.getByRole("form", { name: "Draft the open minutes" });
  await openDraft.getByRole("button", { name: "Save draft" }).click();
  await expect(openDraft.getByText("Write the minutes (at least 10 characters).").first()).toBeVisible();
  await expect(stat.getByTestId("open-minutes-version")).toHaveCount(0);
  await openDraft.getByLabel("Open minutes").fill(OPEN_MINUTES);
  await openDraft.getByRole("button", { name: "Save draft" }).click();
  await expect(stat.getByTestId("open-minutes-version")).toContainText(["Version 1 draft"]);
  await stat.goto(meetingPath.replace(/\/committee$/, "/closed-session"));
  const closedDraft = stat.getByRole("form", { name: "Draft the closed minutes" });
  await closedDraft.getByLabel("Closed minutes").fill(CLOSED_MINUTES);
  await closedDraft.getByRole("button", { name: "Save draft" }).click();
  await expect(stat.getByTestId("closed-minutes-version")).toContainText(["Version 1 draft"]);
  await stat.close();

  // The chair approves both, signs the letter and sends it.
  await page.reload();
  const approveClosed = page.getByRole("form", { name: "Approve the closed minutes" });
  await approveClosed.getByLabel("Password (electronic signature)").fill(ACCOUNTS.dmc.password);
  await approveClosed.getByRole("button", { name: "Approve version 1" }).click();
  await expect(page.getByTestId("closed-minutes-version").first()).toContainText(`approved by ${ACCOUNTS.dmc.name}`);
  await openMeeting(page);
  const approveOpen = page.getByRole("form", { name: "Approve the open minutes" });
  await approveOpen.getByLabel("Password (electronic signature)").fill(ACCOUNTS.dmc.password);
  await approveOpen.getByRole("button", { name: "Approve version 1" }).click();
  await expect(page.getByTestId("open-minutes-version").first()).toContainText(`approved by ${ACCOUNTS.dmc.name}`);
  const sign = page.getByRole("form", { name: "Sign the letter" });
  await sign.getByLabel("Password (electronic signature)").fill(ACCOUNTS.dmc.password);
  await sign.getByRole("button", { name: "Sign the letter" }).click();
  await expect(page.getByTestId("letter-version")).toHaveCount(1);
  await page.getByRole("form", { name: "Send the letter" }).getByRole("button", { name: "E-mail the letter to the sponsor" }).click();
  await expect(page.getByText("Sending letter version 1 to 1 sponsor contact.")).toBeVisible();
  // Delivery is logged: wait for the row to say so (the page is server-rendered, so reload while waiting).
  await expect(async () => {
    await page.reload();
    await expect(page.getByTestId("letter-email-row")).toContainText("sent", { timeout: 2_000 });
  }).toPass({ timeout: 120_000 });
  await expect(page.getByTestId("letter-email-row")).toContainText(ACCOUNTS.sponsor.email);

  // The catcher holds the letter, addressed to the sponsor, with the PDF attached.
  let found = false;
  await expect(async () => {
    for (const f of (await readdir(MAIL_DIR)).filter((x) => x.endsWith(".eml"))) {
      const m = await simpleParser(await readFile(path.join(MAIL_DIR, f)));
      if (!m.subject?.startsWith("CRN-305: recommendation of the data monitoring committee")) continue;
      expect((Array.isArray(m.to) ? m.to[0] : m.to)?.value[0]?.address).toBe(ACCOUNTS.sponsor.email);
      expect(m.attachments.map((a) => a.filename)).toEqual(["CRN-305-dmc-recommendation-letter-v1.pdf"]);
      expect(m.attachments[0].content.subarray(0, 5).toString()).toBe("%PDF-");
      found = true;
    }
    expect(found).toBe(true);
  }).toPass({ timeout: 60_000 });
});

test("the sponsor sees the decision and the letter, and is refused the votes, the closed minutes and the tally", async ({ page }) => {
  await signIn(page, "sponsor");
  await page.goto(trialPath);
  await expect(page.getByTestId("latest-recommendation")).toContainText("Continue as planned");
  const link = page.getByTestId("recommendation-letter-link");
  await expect(link).toContainText(`signed by ${ACCOUNTS.dmc.name}`);
  const href = await link.getAttribute("href");
  const letter = await page.request.get(href!);
  expect(letter.status()).toBe(200);
  expect(letter.headers()["content-type"]).toBe("application/pdf");

  await openMeeting(page);
  await expect(page.getByTestId("meeting-decision")).toContainText("Continue as planned");
  await expect(page.getByTestId("open-minutes-version").first()).toContainText(OPEN_MINUTES);
  await expect(page.getByTestId("closed-session-link")).toHaveCount(0);
  const body = await page.content();
  for (const closed of [CLOSED_COMMENT, CLOSED_MINUTES, DISSENT, "Tally", "Continue with modification: 1"]) expect(body).not.toContain(closed);

  const closedPage = await page.goto(meetingPath.replace(/\/committee$/, "/closed-session"));
  expect(closedPage?.status()).toBe(403);
  const api = await page.request.get(`/api${meetingPath.replace(/\/committee$/, "/closed-session")}`);
  expect(api.status()).toBe(403);
  const apiBody = await api.text();
  for (const closed of [CLOSED_COMMENT, CLOSED_MINUTES, DISSENT, "tally"]) expect(apiBody).not.toContain(closed);
  const status = await page.request.get(`/api${trialPath}/open-status`);
  const json = await status.text();
  expect(json).toContain("/letter?version=1");
  for (const closed of [CLOSED_COMMENT, DISSENT, "tally", "dissent"]) expect(json).not.toContain(closed);
});
