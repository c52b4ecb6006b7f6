/**
 * DMC meetings as the trial coordinator runs them on the demo trial CRN-201 (its look 2 is locked
 * in the seed): schedule a meeting and generate the open report; the unblinded statistician
 * prepares the closed report from the closed review of the look; the coordinator sends the packet
 * and watches delivery; then the administrator finds the caught messages. The meeting is created here, so no other spec's state
 * is relied on.
 */
import { expect, test, type Page } from "@playwright/test";
import { signIn } from "./support/accounts";

test.describe.configure({ mode: "serial" });

const OPEN_SUBJECT = "[CRN-201] DMC meeting packet, open report v1 (look 2)";
/**
 * The meeting is always ahead of the test run (a fixed date would turn into "a time in the past" one
 * day): 15 March of next year. Oslo keeps standard time, UTC+01:00, until European summer time starts
 * on the last Sunday of March (Directive 2000/84/EC, article 2), so the offset shown is known. The
 * weekday is plain calendar arithmetic on the UTC date.
 */
const MEETING_YEAR = new Date().getUTCFullYear() + 1;
const MEETING_WEEKDAY = ["Sunday", "Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday"][new Date(Date.UTC(MEETING_YEAR, 2, 15)).getUTCDay()];
let meetingPath = "";
let openPacketUrl = "";
let closedPacketUrl = "";

async function openTrial(page: Page, code: string): Promise<string> {
  await page.goto("/trials");
  await page.getByRole("link", { name: code, exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/);
  return new URL(page.url()).pathname;
}

test("the coordinator schedules a meeting and generates the open report", async ({ page }) => {
  // PDF generation and background delivery on a busy 2-core machine: more than the default bound.
  test.setTimeout(300_000);
  await signIn(page, "coordinator");
  const base = await openTrial(page, "CRN-201");
  await page.getByRole("link", { name: "Meetings" }).click();
  await expect(page).toHaveURL(`${base}/meetings`);
  const form = page.getByRole("form", { name: "Schedule a DMC meeting" });

  // Bad input: a date in the past gets a message next to the field and nothing is scheduled.
  const look2 = await form.getByLabel("Analysis reviewed").locator("option", { hasText: "Look 2 " }).getAttribute("value");
  await form.getByLabel("Analysis reviewed").selectOption(look2!);
  await form.getByLabel("Date and time").fill("2020-01-06T10:00");
  await form.getByLabel("Time zone").selectOption("Europe/Oslo");
  await form.getByRole("button", { name: "Schedule meeting" }).click();
  await expect(form.getByText("Choose a time in the future.")).toHaveCount(2); // at the top of the form and beside the field
  // What was typed stays in the form after a refusal.
  await expect(form.getByLabel("Time zone")).toHaveValue("Europe/Oslo");

  await form.getByLabel("Date and time").fill(`${MEETING_YEAR}-03-15T14:30`);
  await form.getByLabel("Open session agenda").fill("1. Accrual and data timeliness\n2. <b>Questions</b> from the sponsor");
  await form.getByLabel("Closed session agenda").fill("3. Closed review of look 2");
  await form.getByLabel("Reminder (days before)").fill("2");
  await form.getByRole("button", { name: "Schedule meeting" }).click();
  await expect(page).toHaveURL(new RegExp(`${base}/meetings/\\d+$`));
  meetingPath = new URL(page.url()).pathname;
  await expect(page.getByTestId("meeting-when")).toHaveText(`${MEETING_WEEKDAY} 15 March ${MEETING_YEAR}, 14:30 Europe/Oslo (UTC+01:00)`);
  await expect(page.getByText("2. <b>Questions</b> from the sponsor")).toBeVisible();

  await page.getByRole("button", { name: "Generate open report" }).click();
  await expect(page.getByText("Open report: version 1 (new).")).toBeVisible({ timeout: 60_000 });
  const openLink = page.getByRole("link", { name: "Open report v1" });
  await expect(openLink).toBeVisible();
  // The coordinator is blinded: no closed report is built by this click, and none is offered.
  const closedList = page.getByRole("list", { name: "Closed report versions" });
  await expect(closedList.locator("li")).toHaveCount(0);
  await expect(page.getByText("The unblinded statistician prepares the closed report from the closed review.")).toBeVisible();
  await expect(page.getByTestId("prepare-closed-link")).toHaveCount(0);

  openPacketUrl = (await openLink.getAttribute("href"))!;
  const pdf = await page.request.get(openPacketUrl);
  expect(pdf.status()).toBe(200);
  expect(pdf.headers()["content-type"]).toBe("application/pdf");
  expect((await pdf.body()).subarray(0, 5).toString()).toBe("%PDF-");
});

test("the unblinded statistician prepares the closed report from the closed review of the look", async ({ page }) => {
  test.setTimeout(300_000);
  await signIn(page, "statistician");
  await page.goto(meetingPath);
  await page.getByTestId("prepare-closed-link").click();
  await expect(page).toHaveURL(/\/review\/\d+#closed-packet$/);
  const section = page.getByTestId("closed-packet-meeting").filter({ has: page.locator(`a[href="${meetingPath}"]`) });
  await expect(section).toContainText("3. Closed review of look 2");
  await expect(section).toContainText("Not prepared yet.");
  await section.getByRole("button", { name: "Prepare the closed packet" }).click();
  await expect(section.getByText(/Closed report: version 1 \(new\)/)).toBeVisible({ timeout: 60_000 });
  // Preparing again on unchanged data keeps the version.
  await section.getByRole("button", { name: "Prepare the closed packet" }).click();
  await expect(section.getByText(/Closed report: version 1 \(unchanged\)/)).toBeVisible({ timeout: 60_000 });
  await page.reload();
  const link = section.getByRole("link", { name: "Closed report v1" });
  await expect(link).toBeVisible();
  closedPacketUrl = (await link.getAttribute("href"))!;
  const res = await page.request.get(closedPacketUrl);
  expect(res.status()).toBe(200);
  expect(res.headers()["content-type"]).toBe("application/pdf");
});

test("the coordinator sends the packet: the open report attached, the closed one by link only", async ({ page }) => {
  test.setTimeout(300_000);
  await signIn(page, "coordinator");
  await page.goto(meetingPath);
  // The closed report is listed without a link, and asking for it is refused.
  await expect(page.getByRole("list", { name: "Closed report versions" })).toContainText("only unblinded roles can open it");
  await expect(page.getByRole("link", { name: /Closed report v/ })).toHaveCount(0);
  expect((await page.request.get(closedPacketUrl)).status()).toBe(403);

  await page.getByRole("button", { name: "Send packet by e-mail" }).click();
  await expect(page.getByText(/Sending 5 messages to 5 people \(open report v1, closed report v1 by link\)/)).toBeVisible();
  const rows = page.getByTestId("email-row");
  await expect(rows).toHaveCount(5);
  await expect(rows.filter({ hasText: "sent" })).toHaveCount(5, { timeout: 60_000 });
  await expect(rows.filter({ hasText: "Open report (attached) v1" })).toHaveCount(2);
  await expect(rows.filter({ hasText: "Closed report (link) v1" })).toHaveCount(3);
});

test("a DMC member opens the closed report from the meeting page", async ({ page }) => {
  await signIn(page, "dmc");
  await page.goto(meetingPath);
  const closed = page.getByRole("link", { name: "Closed report v1" });
  await expect(closed).toBeVisible();
  const res = await page.request.get((await closed.getAttribute("href"))!);
  expect(res.status()).toBe(200);
  expect(res.headers()["content-type"]).toBe("application/pdf");
});

test("the sponsor may download the open report but not the closed one", async ({ page }) => {
  await signIn(page, "sponsor");
  expect((await page.request.get(openPacketUrl)).status()).toBe(200);
  const res = await page.request.get(closedPacketUrl);
  expect(res.status()).toBe(403);
  expect(res.headers()["content-type"]).toContain("application/json");
});

test("the administrator sees the caught mail with its PDF attachment", async ({ page }) => {
  await signIn(page, "admin");
  await page.goto("/admin/mail");
  await expect(page.getByRole("heading", { name: "Caught e-mail" })).toBeVisible();
  const mail = page.getByTestId("caught-message").filter({ hasText: OPEN_SUBJECT }).filter({ hasText: "coordinator@cairn.example" }).first();
  await expect(mail).toBeVisible();
  await expect(mail).toContainText("CRN-201-open-report-v1.pdf");
  await expect(mail).toContainText("application/pdf");
  const notice = page.getByTestId("caught-message").filter({ hasText: "closed report v1 ready in Cairn" }).filter({ hasText: "dmc@cairn.example" }).first();
  await expect(notice).toContainText("none");
  const eml = await page.request.get((await mail.getByRole("link", { name: ".eml" }).getAttribute("href"))!);
  expect(eml.status()).toBe(200);
  expect(await eml.text()).toContain("Content-Type: application/pdf");
});

test("someone who is not an administrator cannot open the caught mail", async ({ page }) => {
  await signIn(page, "coordinator");
  const res = await page.goto("/admin/mail");
  expect(res?.status()).toBe(403);
});
