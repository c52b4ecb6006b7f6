/**
 * Interim data as the unblinded statistician would enter it, on the demo trials' planned looks
 * only (CRN-305 looks 2 and 3, CRN-201 looks 3 and 4): two looks by hand, one by CSV upload, each
 * locked with the password; a bad CSV gets a row-by-row report and writes nothing. The numbers on
 * screen are compared with what was typed or with counts computed here from the generated file.
 */
import { expect, test, type Page } from "@playwright/test";
import { ACCOUNTS, signIn } from "./support/accounts";

test.describe.configure({ mode: "serial" });

async function openTrial(page: Page, code: string): Promise<string> {
  await page.goto("/trials");
  await page.getByRole("link", { name: code, exact: true }).click();
  await expect(page).toHaveURL(/\/trials\/\d+$/);
  return new URL(page.url()).pathname;
}

async function openLook(page: Page, code: string, look: number) {
  const base = await openTrial(page, code);
  await page.getByRole("link", { name: "Interim data" }).click();
  await expect(page.getByRole("table", { name: "Looks" })).toBeVisible();
  await goToLook(page, look);
  return base;
}

async function goToLook(page: Page, look: number) {
  const href = await page.getByRole("link", { name: new RegExp(`^(Start|Enter data|View): look ${look}$`) }).getAttribute("href");
  expect(href).toMatch(/\/analyses\/\d+$/);
  await page.goto(href!);
  await expect(page.getByRole("heading", { name: `Look ${look}` })).toBeVisible();
}

async function openForEntry(page: Page, cutoff: string) {
  const form = page.getByRole("form", { name: "Open this look for entry" });
  await form.getByLabel("Data cut-off date").fill(cutoff);
  await form.getByRole("button", { name: "Open for entry" }).click();
  await expect(page.getByRole("form", { name: "Enter counts by hand" })).toBeVisible();
  await expect(page.getByTestId("look-cutoff")).toHaveText(cutoff);
}

async function lockWithPassword(page: Page, look: number) {
  const form = page.getByRole("form", { name: "Lock this look" });
  await form.getByLabel("Your password (to sign)").fill("wrong-password");
  await form.getByRole("button", { name: "Sign and lock" }).click();
  await expect(form.getByText("The password is not correct, so nothing was signed.").first()).toBeVisible();
  await form.getByLabel("Your password (to sign)").fill(ACCOUNTS.statistician.password);
  await form.getByRole("button", { name: "Sign and lock" }).click();
  await expect(page.getByTestId("lock-signature")).toContainText(`Signed by ${ACCOUNTS.statistician.name} (analysis locked)`);
  await expect(page.getByRole("form", { name: "Correct this look" })).toBeVisible();
  await expect(page.getByRole("form", { name: "Enter counts by hand" })).toHaveCount(0);
  // A lasting confirmation, still there after a reload, with the way on to the look's closed review.
  await page.reload();
  await expect(page.getByTestId("lock-confirmation")).toContainText("Its counts are now the record of look");
  await expect(page.getByTestId("lock-confirmation").getByRole("link", { name: /^Open the closed review of look \d+$/ })).toHaveAttribute("href", /\/trials\/\d+\/review\/\d+$/);
  void look;
}

async function expectRecorded(page: Page, role: string, want: { enrolled: number; evaluable: number; responders: number; treated?: number; toxicities?: number }) {
  const row = page.getByTestId(`recorded-${role}`);
  await expect(row.getByTestId("enrolled")).toHaveText(String(want.enrolled));
  await expect(row.getByTestId("evaluable")).toHaveText(String(want.evaluable));
  await expect(row.getByTestId("responders")).toHaveText(String(want.responders));
  if (want.treated !== undefined) await expect(row.getByTestId("treated")).toHaveText(String(want.treated));
  if (want.toxicities !== undefined) await expect(row.getByTestId("toxicities")).toHaveText(String(want.toxicities));
}

test("CRN-305 look 2 by hand: validation messages, then save and lock", async ({ page }) => {
  await signIn(page, "statistician");
  await openLook(page, "CRN-305", 2);
  await openForEntry(page, "2026-10-31");
  const form = page.getByRole("form", { name: "Enter counts by hand" });
  const cell = (arm: string, what: string) => form.getByLabel(`${arm}: ${what}`, { exact: true });
  // Impossible counts: responders above evaluable, evaluable above enrolled.
  await cell("TLM-417 + standard care", "enrolled").fill("41");
  await cell("TLM-417 + standard care", "evaluable for response").fill("40");
  await cell("TLM-417 + standard care", "responders").fill("45");
  await cell("Standard care", "enrolled").fill("38");
  await cell("Standard care", "evaluable for response").fill("40");
  await cell("Standard care", "responders").fill("12");
  await form.getByRole("button", { name: "Save counts" }).click();
  await expect(form.getByText("Responders (45) cannot exceed evaluable for response (40).")).toHaveCount(2); // at the top of the form and beside the field
  await expect(form.getByText("Evaluable for response (40) cannot exceed enrolled (38).")).toHaveCount(2); // at the top of the form and beside the field
  await expect(page.getByRole("table", { name: "Recorded counts" })).toHaveCount(0);
  // Corrected; what was typed stays in the inputs.
  await expect(cell("Standard care", "responders")).toHaveValue("12");
  await cell("TLM-417 + standard care", "responders").fill("18");
  await cell("Standard care", "enrolled").fill("42");
  await form.getByRole("button", { name: "Save counts" }).click();
  await expect(page.getByText("Counts saved (83 enrolled in total).")).toBeVisible();
  await expectRecorded(page, "experimental", { enrolled: 41, evaluable: 40, responders: 18 });
  await expectRecorded(page, "control", { enrolled: 42, evaluable: 40, responders: 12 });
  await expect(page.getByTestId("look-enrolled-total")).toHaveText("83");
  await expect(page.getByRole("table", { name: "Recorded counts" })).toContainText("45.0%"); // 18 / 40
  await lockWithPassword(page, 2);
  await expectRecorded(page, "experimental", { enrolled: 41, evaluable: 40, responders: 18 });
});

/** A generated patient file and its counts, computed here independently of the app. */
function patientFile(perArm: number, cutoff: string) {
  const lines = ["subject_id,arm,enrolment_date,evaluable,response,toxicity"];
  const want = { experimental: { enrolled: 0, evaluable: 0, responders: 0 }, control: { enrolled: 0, evaluable: 0, responders: 0 } };
  for (let i = 1; i <= perArm * 2; i++) {
    const role = i % 2 ? "experimental" : "control";
    const evaluable = i % 11 !== 0;
    const responder = evaluable && (role === "experimental" ? i % 5 < 3 : i % 4 === 0);
    const day = String(1 + (i % 28)).padStart(2, "0");
    const month = String(8 + (i % 3)).padStart(2, "0");
    lines.push(`E-${String(i).padStart(3, "0")},${i % 4 === 1 ? "TLM-417 + standard care" : role},2026-${month}-${day},${evaluable ? "yes" : "no"},${evaluable ? (responder ? "yes" : "no") : ""},`);
    const w = want[role];
    w.enrolled++;
    if (evaluable) w.evaluable++;
    if (responder) w.responders++;
  }
  void cutoff;
  return { text: lines.join("\n") + "\n", want };
}

test("CRN-305 look 3 by CSV: a bad file gets a row-by-row report and writes nothing; a good one is previewed, written and locked", async ({ page }) => {
  await signIn(page, "statistician");
  const base = await openLook(page, "CRN-305", 3);
  await openForEntry(page, "2026-11-25");
  const upload = page.getByRole("group", { name: "Upload patient-level data" });
  const bad = [
    "subject_id,arm,enrolment_date,evaluable,response,toxicity",
    "B-001,experimental,2026-10-01,yes,yes,",
    "B-002,Placebo,2026-10-02,yes,no,",
    "B-003,control,2026-10-03,no,yes,",
    "B-004,control,2026-12-01,yes,no,",
    "B-001,control,2026-10-04,yes,no,",
  ].join("\n");
  await upload.getByLabel("Patient CSV file").setInputFiles({ name: "bad-look3.csv", mimeType: "text/csv", buffer: Buffer.from(bad) });
  await upload.getByRole("button", { name: "Check file" }).click();
  const problems = upload.getByRole("table", { name: "Problems in the file" });
  await expect(problems).toBeVisible();
  await expect(upload.getByText("3 problems in 5 patient rows")).toBeVisible();
  const rows = problems.getByRole("row");
  await expect(rows).toHaveCount(4);
  await expect(rows.nth(1).getByRole("cell")).toHaveText(["3", "arm", /Unknown arm "Placebo"/]);
  await expect(rows.nth(2).getByRole("cell")).toHaveText(["4", "response", /not evaluable/]);
  await expect(rows.nth(3).getByRole("cell")).toHaveText(["6", "subject_id", /already appears on line 2/]);
  // Line 5 was enrolled after the cut-off: left out of the look and listed, not a problem.
  await expect(upload.getByRole("table", { name: "Rows left out (enrolled after the cut-off)" }).getByRole("row").nth(1).getByRole("cell")).toHaveText(["5", "B-004", "2026-12-01"]);
  await expect(upload.getByRole("button", { name: /Write/ })).toHaveCount(0);
  // A file that is not CSV, and one over the size limit (refused in the browser before upload).
  await upload.getByLabel("Patient CSV file").setInputFiles({ name: "scan.csv", mimeType: "text/csv", buffer: Buffer.from([0x89, 0x50, 0x4e, 0x47, 0, 0, 0, 13, 0x49, 0x48]) });
  await upload.getByRole("button", { name: "Check file" }).click();
  await expect(upload.getByText(/This is not a CSV file: it contains binary data/)).toBeVisible();
  await upload.getByLabel("Patient CSV file").setInputFiles({ name: "huge.csv", mimeType: "text/csv", buffer: Buffer.alloc(6 * 1024 * 1024, 0x41) });
  await expect(upload.getByText(/The file is 6\.0 MB; the limit is 5 MB/)).toBeVisible();
  // Nothing was written.
  await page.reload();
  await expect(page.getByRole("table", { name: "Recorded counts" })).toHaveCount(0);
  await expect(page.getByTestId("look-enrolled-total")).toHaveText("—");

  const { text, want } = patientFile(55, "2026-11-25");
  // Two patients enrolled after the cut-off: left out of the look and listed (finding 6).
  const withLate = text + "L-001,control,2026-11-26,yes,yes,\nL-002,experimental,2026-12-03,no,,\n";
  await upload.getByLabel("Patient CSV file").setInputFiles({ name: "look3.csv", mimeType: "text/csv", buffer: Buffer.from(withLate) });
  await upload.getByRole("button", { name: "Check file" }).click();
  const derived = upload.getByRole("table", { name: "Counts derived from the file" });
  await expect(derived).toBeVisible();
  const w = (c: { enrolled: number; evaluable: number; responders: number }) => [String(c.enrolled), String(c.evaluable), String(c.responders)];
  await expect(derived.getByRole("row").nth(1).getByRole("cell")).toHaveText(["TLM-417 + standard care", ...w(want.experimental)]);
  await expect(derived.getByRole("row").nth(2).getByRole("cell")).toHaveText(["Standard care", ...w(want.control)]);
  const left = upload.getByRole("table", { name: "Rows left out (enrolled after the cut-off)" });
  await expect(left.getByRole("row")).toHaveCount(3);
  await expect(left.getByRole("row").nth(1).getByRole("cell")).toHaveText(["112", "L-001", "2026-11-26"]);
  await expect(left.getByRole("row").nth(2).getByRole("cell")).toHaveText(["113", "L-002", "2026-12-03"]);
  // Preview only: still nothing recorded.
  await expect(page.getByRole("table", { name: "Recorded counts" })).toHaveCount(0);
  await upload.getByRole("button", { name: "Write 110 patient rows" }).click();
  await expect(upload.getByText(/110 patient rows written; .* 2 rows enrolled after the cut-off left out\./)).toBeVisible();
  await expectRecorded(page, "experimental", want.experimental);
  await expectRecorded(page, "control", want.control);
  await expect(page.getByTestId("look-enrolled-total")).toHaveText(String(want.experimental.enrolled + want.control.enrolled));
  const grid = page.getByRole("region", { name: "Patient-level rows" });
  await expect(grid.getByText("E-001", { exact: true })).toBeVisible();
  // A patient-level look: its counts come from the rows, so the hand-entry form gives way to the switch (finding 6).
  await expect(page.getByTestId("data-level")).toHaveText("Patient-level: derived from 110 uploaded patient rows.");
  await expect(page.getByRole("form", { name: "Enter counts by hand" })).toHaveCount(0);
  await expect(page.getByRole("form", { name: "Switch to count-level entry" })).toBeVisible();
  await lockWithPassword(page, 3);
  await expectRecorded(page, "control", want.control);

  // The list of looks shows both looks locked with the pooled totals.
  await page.goto(`${base}/analyses`);
  await expect(page.getByTestId("look-row-2")).toContainText("83");
  await expect(page.getByTestId("look-row-2")).toContainText("Locked");
  await expect(page.getByTestId("look-row-3")).toContainText(String(want.experimental.enrolled + want.control.enrolled));
  await expect(page.getByTestId("look-row-3")).toContainText("Locked");
});

test("CRN-201 look 3 by hand with toxicities (safety rule), locked; look 4 refuses a bad CSV", async ({ page }) => {
  await signIn(page, "statistician");
  const base = await openLook(page, "CRN-201", 3);
  await openForEntry(page, "2026-11-15");
  const form = page.getByRole("form", { name: "Enter counts by hand" });
  const arm = "TLM-417 400 mg";
  await form.getByLabel(`${arm}: enrolled`).fill("31");
  await form.getByLabel(`${arm}: evaluable for response`).fill("30");
  await form.getByLabel(`${arm}: responders`).fill("10");
  await form.getByLabel(`${arm}: treated (evaluable for toxicity)`).fill("31");
  await form.getByLabel(`${arm}: with toxicity`).fill("");
  await form.getByRole("button", { name: "Save counts" }).click();
  await expect(form.getByText("Enter the number with toxicity as a whole number.")).toHaveCount(2); // at the top of the form and beside the field
  await form.getByLabel(`${arm}: with toxicity`).fill("4");
  await form.getByRole("button", { name: "Save counts" }).click();
  await expect(page.getByText("Counts saved (31 enrolled in total).")).toBeVisible();
  await expectRecorded(page, "single", { enrolled: 31, evaluable: 30, responders: 10, treated: 31, toxicities: 4 });
  await lockWithPassword(page, 3);
  await expectRecorded(page, "single", { enrolled: 31, evaluable: 30, responders: 10, treated: 31, toxicities: 4 });

  // Look 4: a CSV without the toxicity column is refused and nothing is written.
  await page.goto(`${base}/analyses`);
  await goToLook(page, 4);
  await openForEntry(page, "2026-11-30");
  const upload = page.getByRole("group", { name: "Upload patient-level data" });
  await upload.getByLabel("Patient CSV file").setInputFiles({
    name: "no-toxicity.csv",
    mimeType: "text/csv",
    buffer: Buffer.from("subject_id,arm,enrolment_date,evaluable,response\nA-1,single,2026-11-01,yes,yes\n"),
  });
  await upload.getByRole("button", { name: "Check file" }).click();
  await expect(upload.getByRole("table", { name: "Problems in the file" })).toContainText('The column "toxicity" is missing from the header line.');
  await page.reload();
  await expect(page.getByRole("table", { name: "Recorded counts" })).toHaveCount(0);
});

test("the audit trail: the statistician sees the closed count entries in their own time zone; the sponsor sees open entries only", async ({ browser }) => {
  const stat = await browser.newContext({ timezoneId: "America/Chicago" });
  const page = await stat.newPage();
  await signIn(page, "statistician");
  const base = await openTrial(page, "CRN-305");
  await page.goto(`${base}/audit`);
  await expect(page.getByTestId("audit-zone")).toContainText("America/Chicago");
  const grid = page.getByRole("region", { name: "Audit trail entries" });
  await expect(grid.getByText("Patient data uploaded").first()).toBeVisible();
  // The grid draws only the rows in view (taller now that changes wrap): filter to the entries asked about.
  await page.getByLabel("Action", { exact: true }).selectOption("Counts entered");
  await expect(grid.getByText("Counts entered", { exact: true }).first()).toBeVisible();
  // The seed's entries are shown as made by "demo data", and changes as words, not JSON.
  await expect(grid.getByText("demo data").first()).toBeVisible();
  await expect(grid.getByText(/^\{"/)).toHaveCount(0);
  // Chicago in late 2026: UTC-06:00 (CST) after the first Sunday of November.
  await expect(grid.getByText(/2026-\d\d-\d\d \d\d:\d\d:\d\d -0[56]:00/).first()).toBeVisible();
  await page.getByLabel("Action", { exact: true }).selectOption("Look locked");
  await expect(grid.getByText("Counts entered", { exact: true })).toHaveCount(0);
  await stat.close();

  const sponsorCtx = await browser.newContext();
  const sp = await sponsorCtx.newPage();
  await signIn(sp, "sponsor");
  await sp.goto(`${base}/audit`);
  await expect(sp.getByTestId("audit-zone")).toContainText("Your role is blinded");
  const spGrid = sp.getByRole("region", { name: "Audit trail entries" });
  await expect(spGrid.getByText("Look locked").first()).toBeVisible();
  await expect(spGrid.getByText("Counts entered", { exact: true })).toHaveCount(0);
  await expect(spGrid.getByText("Patient data uploaded")).toHaveCount(0);
  const api = await sp.request.get(`/api${base}/audit`);
  expect(api.status()).toBe(200);
  const body = await api.json();
  expect(body.openOnly).toBe(true);
  expect(body.entries.length).toBeGreaterThan(0);
  expect(body.entries.every((e: { visibility: string }) => e.visibility === "open")).toBe(true);
  // Blinded roles cannot reach the interim data API for arm-level rows.
  const looks = await (await sp.request.get(`/api${base}/analyses`)).json();
  const one = await (await sp.request.get(`/api${base}/analyses/${looks.analyses[0].id}`)).json();
  expect(one.counts).toBeUndefined();
  expect((await sp.request.get(`/api${base}/analyses/${looks.analyses[0].id}/patients`)).status()).toBe(403);
  await sponsorCtx.close();
});

test("the upload API refuses a 50 MB body early with 413, and a stale save with 409", async ({ page }) => {
  await signIn(page, "statistician");
  const base = await openTrial(page, "CRN-201");
  const looks = (await (await page.request.get(`/api${base}/analyses`)).json()).analyses as Array<{ id: number; lookNumber: number; rowVersion: number; status: string }>;
  const look4 = looks.find((l) => l.lookNumber === 4)!;
  expect(look4.status).toBe("open");
  const big = await page.request.post(`/api${base}/analyses/${look4.id}/upload/preview`, { headers: { "Content-Type": "text/csv" }, data: Buffer.alloc(50 * 1024 * 1024, 0x41) });
  expect(big.status()).toBe(413);
  expect((await big.json()).error).toMatch(/limit is 5 MB/);
  const armId = (await (await page.request.get(`/api${base}/analyses/${look4.id}`)).json()).arms[0].id as number;
  const stale = await page.request.put(`/api${base}/analyses/${look4.id}/counts`, {
    data: { rowVersion: look4.rowVersion - 1, cutoffDate: "2026-11-30", counts: [{ armId, enrolled: 1, treated: 1, evaluable: 1, responders: 0, toxicities: 0 }] },
  });
  expect(stale.status()).toBe(409);
  expect((await stale.json()).error).toMatch(/Someone else saved look 4/);
  const after = (await (await page.request.get(`/api${base}/analyses/${look4.id}`)).json()) as { analysis: { rowVersion: number }; counts: unknown[] };
  expect(after.analysis.rowVersion).toBe(look4.rowVersion);
  expect(after.counts).toEqual([]);
});
