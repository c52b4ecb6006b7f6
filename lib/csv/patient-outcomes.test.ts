import { describe, expect, it } from "vitest";
import fc from "fast-check";
import Papa from "papaparse";
import {
  MAX_UPLOAD_BYTES,
  NotCsvError,
  decodeCsvBytes,
  deriveArmCounts,
  isIsoDate,
  parsePatientCsv,
  resolveArm,
  type PatientCsvContext,
  type PatientRecord,
} from "./patient-outcomes";

const TWO_ARMS: PatientCsvContext = {
  arms: [
    { id: 11, label: "TLM-417 + standard care", role: "experimental" },
    { id: 12, label: "Standard care", role: "control" },
  ],
  cutoffDate: "2026-10-31",
  safetyRule: false,
};
const ONE_ARM_SAFETY: PatientCsvContext = { arms: [{ id: 5, label: "TLM-417 400 mg", role: "single" }], cutoffDate: "2026-10-31", safetyRule: true };

const HEADER = "subject_id,arm,enrolment_date,evaluable,response,toxicity";
const csv = (...lines: string[]) => [HEADER, ...lines].join("\n") + "\n";
const enc = (s: string) => new TextEncoder().encode(s);

function expectIssue(text: string, ctx: PatientCsvContext, want: { line: number | null; column: string | null; message: RegExp }) {
  const r = parsePatientCsv(text, ctx);
  expect(r.ok).toBe(false);
  if (r.ok) return;
  expect(r.issues).toContainEqual(expect.objectContaining({ line: want.line, column: want.column, message: expect.stringMatching(want.message) }));
}

describe("parsePatientCsv: a valid file", () => {
  it("reads every patient, maps arms by label or role, and derives counts by hand-checked totals", () => {
    const text = csv(
      "S-001,experimental,2026-05-02,yes,yes,no",
      "S-002,Standard care,2026-05-03,yes,no,no",
      "S-003,TLM-417 + standard care,2026-05-10,1,0,0",
      "S-004,control,2026-06-01,no,,no",
      "S-005,CONTROL,2026-06-02,true,true,false",
      "S-006,experimental,2026-10-31,Y,N,",
    );
    const r = parsePatientCsv(text, TWO_ARMS);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.rowCount).toBe(6);
    expect(r.rows.map((x) => x.armId)).toEqual([11, 12, 11, 12, 12, 11]);
    expect(r.rows[3]).toEqual({ subjectId: "S-004", armId: 12, enrolledOn: "2026-06-01", evaluable: false, pending: false, responder: null, treated: null, toxicity: false, sourceLine: 5 });
    // Experimental: S-001 (R), S-003 (NR), S-006 (NR, on the cut-off day) -> 3 enrolled, 3 evaluable, 1 responder.
    // Control: S-002 (NR), S-004 (not evaluable), S-005 (R) -> 3 enrolled, 2 evaluable, 1 responder.
    expect(r.counts).toEqual([
      { armId: 11, enrolled: 3, treated: null, evaluable: 3, responders: 1, toxicities: null, pending: 0 },
      { armId: 12, enrolled: 3, treated: null, evaluable: 2, responders: 1, toxicities: null, pending: 0 },
    ]);
  });

  it("accepts a byte-order mark, CRLF line ends, semicolons, quoted fields and extra columns", () => {
    const text = "\uFEFFsite;subject_id;arm;enrolment_date;evaluable;response;toxicity\r\n" + '"Site 1; north";S-1;"TLM-417 400 mg";2026-01-05;yes;yes;yes\r\n' + "Site 2;S-2;single;2026-01-06;yes;no;no\r\n";
    const r = parsePatientCsv(decodeCsvBytes(enc(text)), ONE_ARM_SAFETY);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.counts).toEqual([{ armId: 5, enrolled: 2, treated: 2, evaluable: 2, responders: 1, toxicities: 1, pending: 0 }]);
  });

  it("numbers lines as an editor does, even after a quoted field that spans two lines", () => {
    const text = [HEADER.replace("toxicity", "toxicity,note"), 'S-1,single,2026-01-05,yes,yes,no,"first line', 'second line"', "S-2,single,2026-01-06,yes,maybe,no,ok"].join("\n");
    expectIssue(text, ONE_ARM_SAFETY, { line: 4, column: "response", message: /Response must be yes or no/ });
  });
});

describe("parsePatientCsv: each kind of bad row is reported with its line, column and reason", () => {
  it("unknown arm", () => {
    expectIssue(csv("S-1,experimental,2026-01-05,yes,yes,", "S-2,Placebo arm,2026-01-05,yes,yes,"), TWO_ARMS, { line: 3, column: "arm", message: /Unknown arm "Placebo arm"/ });
  });
  it("a response on a patient who is not evaluable", () => {
    expectIssue(csv("S-1,control,2026-01-05,no,yes,"), TWO_ARMS, { line: 2, column: "response", message: /not evaluable/ });
  });
  it("an evaluable patient with no response", () => {
    expectIssue(csv("S-1,control,2026-01-05,yes,,"), TWO_ARMS, { line: 2, column: "response", message: /response is empty/ });
  });
  it("finding 6: a file whose every row is after the cut-off has no data for the look", () => {
    expectIssue(csv("S-1,control,2026-11-01,yes,no,"), TWO_ARMS, { line: null, column: "enrolment_date", message: /No patient in the file was enrolled on or before the data cut-off 2026-10-31 \(1 row is after it\)/ });
  });
  it("a date that is not a calendar date or not YYYY-MM-DD", () => {
    expectIssue(csv("S-1,control,2026-02-30,yes,no,"), TWO_ARMS, { line: 2, column: "enrolment_date", message: /not a valid date/ });
    expectIssue(csv("S-1,control,05/01/2026,yes,no,"), TWO_ARMS, { line: 2, column: "enrolment_date", message: /YYYY-MM-DD/ });
  });
  it("a duplicate subject (case-insensitive), naming the first line", () => {
    expectIssue(csv("S-1,control,2026-01-05,yes,no,", "S-2,control,2026-01-05,yes,no,", "s-1,experimental,2026-01-06,yes,yes,"), TWO_ARMS, {
      line: 4,
      column: "subject_id",
      message: /already appears on line 2/,
    });
  });
  it("a missing column", () => {
    const text = "subject_id,arm,enrolment_date,evaluable,toxicity\nS-1,control,2026-01-05,yes,no\n";
    expectIssue(text, TWO_ARMS, { line: 1, column: "response", message: /"response" is missing/ });
  });
  it("a missing toxicity outcome when the design has a safety rule", () => {
    expectIssue(csv("S-1,single,2026-01-05,yes,no,"), ONE_ARM_SAFETY, { line: 2, column: "toxicity", message: /safety rule/ });
  });
  it("a bad flag, an empty subject, a formula-like subject", () => {
    expectIssue(csv("S-1,control,2026-01-05,perhaps,no,"), TWO_ARMS, { line: 2, column: "evaluable", message: /Evaluable must be yes, no or pending/ });
    expectIssue(csv(",control,2026-01-05,yes,no,"), TWO_ARMS, { line: 2, column: "subject_id", message: /empty/ });
    expectIssue(csv("=cmd(),control,2026-01-05,yes,no,"), TWO_ARMS, { line: 2, column: "subject_id", message: /start with a letter or digit/ });
  });
  it("a row with the wrong number of fields", () => {
    expectIssue(csv("S-1,control,2026-01-05,yes"), TWO_ARMS, { line: 2, column: null, message: /4 fields but the header has 6/ });
  });
  it("reports every bad row, not just the first, and accepts none of the good ones", () => {
    const r = parsePatientCsv(csv("S-1,control,2026-01-05,yes,no,", "S-2,nowhere,2026-01-05,yes,no,", "S-3,control,2026-02-30,yes,no,", "S-4,control,2026-01-05,no,yes,"), TWO_ARMS);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues.map((i) => [i.line, i.column])).toEqual([[3, "arm"], [4, "enrolment_date"], [5, "response"]]);
  });
  it("a header with no rows, and an empty file", () => {
    expectIssue(HEADER + "\n", TWO_ARMS, { line: null, column: null, message: /no patient rows/ });
    expectIssue("", TWO_ARMS, { line: null, column: null, message: /no rows/ });
  });
  it("prose instead of CSV", () => {
    expectIssue("Dear data manager, please find the results attached.\nBest wishes\n", TWO_ARMS, { line: 1, column: null, message: /does not look like a CSV export/ });
  });
});

describe("finding 6: rows dated after the cut-off are left out of the look and listed, not refused", () => {
  it("keeps the rows on or before the cut-off, lists the others by line and subject, and does not check them", () => {
    const r = parsePatientCsv(
      csv(
        "S-1,control,2026-10-30,yes,no,",
        "S-2,experimental,2026-11-01,yes,yes,",
        "S-3,experimental,2026-10-31,yes,yes,", // on the cut-off day: belongs to the look
        "S-4,Placebo,2026-12-15,maybe,,", // after the cut-off: not this look's, so not checked
      ),
      TWO_ARMS,
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.rowCount).toBe(4);
    expect(r.rows.map((x) => x.subjectId)).toEqual(["S-1", "S-3"]);
    expect(r.excluded).toEqual({
      count: 2,
      cutoffDate: "2026-10-31",
      rows: [
        { line: 3, subjectId: "S-2", enrolmentDate: "2026-11-01" },
        { line: 5, subjectId: "S-4", enrolmentDate: "2026-12-15" },
      ],
    });
    // Counted by hand: experimental S-3 (responder), control S-1 (non-responder).
    expect(r.counts).toEqual([
      { armId: 11, enrolled: 1, treated: null, evaluable: 1, responders: 1, toxicities: null, pending: 0 },
      { armId: 12, enrolled: 1, treated: null, evaluable: 1, responders: 0, toxicities: null, pending: 0 },
    ]);
  });
  it("a bad row before the cut-off still fails the file, and the report of excluded rows comes with it", () => {
    const r = parsePatientCsv(csv("S-1,control,2026-10-30,yes,,", "S-2,control,2026-11-02,yes,no,"), TWO_ARMS);
    expect(r.ok).toBe(false);
    expect(r.excluded.count).toBe(1);
  });
});

describe("finding 1: treated (evaluable for toxicity) is its own denominator", () => {
  const T_HEADER = "subject_id,arm,enrolment_date,evaluable,response,toxicity,treated";
  const tcsv = (...lines: string[]) => [T_HEADER, ...lines].join("\n") + "\n";
  it("with a treated column: toxicities are counted among treated patients, independently of evaluable for response", () => {
    const r = parsePatientCsv(
      tcsv(
        "P-1,single,2026-01-05,yes,yes,yes,yes",
        "P-2,single,2026-01-06,no,,yes,yes", // treated, toxic, not evaluable for response
        "P-3,single,2026-01-07,no,,no,yes",
        "P-4,single,2026-01-08,no,,,no", // enrolled, not treated yet
      ),
      ONE_ARM_SAFETY,
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    // By hand: 4 enrolled, 3 treated (P-1..P-3), 2 with toxicity (P-1, P-2), 1 evaluable for response (P-1), 1 responder.
    expect(r.counts).toEqual([{ armId: 5, enrolled: 4, treated: 3, evaluable: 1, responders: 1, toxicities: 2, pending: 0 }]);
    expect(r.rows.map((x) => x.treated)).toEqual([true, true, true, false]);
  });
  it("without a treated column every patient enrolled by the cut-off counts as treated", () => {
    const r = parsePatientCsv(csv("P-1,single,2026-01-05,yes,no,yes", "P-2,single,2026-01-06,no,,no"), ONE_ARM_SAFETY);
    expect(r.ok && r.counts).toEqual([{ armId: 5, enrolled: 2, treated: 2, evaluable: 1, responders: 0, toxicities: 1, pending: 0 }]);
  });
  it("a treated patient needs a toxicity outcome; an untreated one must have none; the flag is required under a safety rule", () => {
    expectIssue(tcsv("P-1,single,2026-01-05,yes,no,,yes"), ONE_ARM_SAFETY, { line: 2, column: "toxicity", message: /treated but the toxicity outcome is empty/ });
    expectIssue(tcsv("P-1,single,2026-01-05,yes,no,no,no"), ONE_ARM_SAFETY, { line: 2, column: "toxicity", message: /not treated/ });
    expectIssue(tcsv("P-1,single,2026-01-05,yes,no,no,"), ONE_ARM_SAFETY, { line: 2, column: "treated", message: /treated flag is empty/ });
    expectIssue(tcsv("P-1,single,2026-01-05,yes,no,no,sometimes"), ONE_ARM_SAFETY, { line: 2, column: "treated", message: /Treated must be yes or no/ });
  });
  it("without a safety rule the treated column is read but nothing is counted", () => {
    const r = parsePatientCsv(tcsv("S-1,control,2026-01-05,yes,no,,no"), TWO_ARMS);
    expect(r.ok && r.counts.map((c) => [c.treated, c.toxicities])).toEqual([
      [null, null],
      [null, null],
    ]);
  });
});

describe("decodeCsvBytes: files that are not CSV text", () => {
  it("refuses binary content (a PNG signature)", () => {
    expect(() => decodeCsvBytes(new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]))).toThrow(NotCsvError);
  });
  it("refuses text that is not UTF-8 (Latin-1 bytes)", () => {
    expect(() => decodeCsvBytes(new Uint8Array([0x53, 0x2d, 0xe9, 0x2c, 0x41]))).toThrow(/UTF-8/);
  });
  it("refuses an empty file and a file over the limit", () => {
    expect(() => decodeCsvBytes(new Uint8Array())).toThrow(/empty/);
    expect(() => decodeCsvBytes(new Uint8Array(MAX_UPLOAD_BYTES + 1))).toThrow(/limit is 5 MB/);
  });
});

describe("helpers", () => {
  it("isIsoDate knows leap years (2024 is, 2100 is not: Gregorian rule)", () => {
    expect(isIsoDate("2024-02-29")).toBe(true);
    expect(isIsoDate("2100-02-29")).toBe(false);
    expect(isIsoDate("2026-13-01")).toBe(false);
  });
  it("resolveArm prefers an exact label, then a role", () => {
    expect(resolveArm(" standard CARE ", TWO_ARMS.arms)?.id).toBe(12);
    expect(resolveArm("experimental", TWO_ARMS.arms)?.id).toBe(11);
    expect(resolveArm("single", TWO_ARMS.arms)).toBeUndefined();
  });
});

describe("properties (fast-check): any valid file round-trips and its counts obey the identities", () => {
  const patient = fc.record({
    arm: fc.constantFrom(11, 12),
    day: fc.integer({ min: 1, max: 28 }),
    month: fc.integer({ min: 1, max: 10 }),
    evaluable: fc.boolean(),
    responder: fc.boolean(),
  });
  it("enrolled sums to the rows, responders <= evaluable <= enrolled, and equals a direct count", () => {
    fc.assert(
      fc.property(fc.array(patient, { minLength: 1, maxLength: 60 }), (ps) => {
        // Written with papaparse's own unparse, the reference writer of the same package.
        const text = Papa.unparse({
          fields: ["subject_id", "arm", "enrolment_date", "evaluable", "response", "toxicity"],
          data: ps.map((p, i) => [
            `P${i}`,
            p.arm === 11 ? "experimental" : "Standard care",
            `2026-${String(p.month).padStart(2, "0")}-${String(p.day).padStart(2, "0")}`,
            p.evaluable ? "yes" : "no",
            p.evaluable ? (p.responder ? "yes" : "no") : "",
            "",
          ]),
        });
        const r = parsePatientCsv(text, TWO_ARMS);
        expect(r.ok).toBe(true);
        if (!r.ok) return;
        expect(r.counts.reduce((s, c) => s + c.enrolled, 0)).toBe(ps.length);
        for (const c of r.counts) {
          expect(c.responders).toBeLessThanOrEqual(c.evaluable);
          expect(c.evaluable).toBeLessThanOrEqual(c.enrolled);
          const mine = ps.filter((p) => p.arm === c.armId);
          expect(c.responders).toBe(mine.filter((p) => p.evaluable && p.responder).length);
        }
      }),
      { numRuns: 200, seed: 20261202 },
    );
  });

  it("deriveArmCounts leaves out patients enrolled after the cut-off", () => {
    const rows: PatientRecord[] = [
      { subjectId: "A", armId: 5, enrolledOn: "2026-10-31", evaluable: true, pending: false, responder: true, treated: true, toxicity: true, sourceLine: 2 },
      { subjectId: "B", armId: 5, enrolledOn: "2026-11-01", evaluable: true, pending: false, responder: true, treated: true, toxicity: true, sourceLine: 3 },
    ];
    expect(deriveArmCounts(rows, ONE_ARM_SAFETY)).toEqual([{ armId: 5, enrolled: 1, treated: 1, evaluable: 1, responders: 1, toxicities: 1, pending: 0 }]);
  });
});

describe("parsePatientCsv: pending outcomes (evaluable = pending)", () => {
  it("counts a patient whose response is not yet known as pending, not as evaluable, and keeps the row", () => {
    const r = parsePatientCsv(
      csv(
        "S-001,experimental,2026-05-02,yes,yes,",
        "S-002,experimental,2026-05-03,pending,,",
        "S-003,experimental,2026-05-04,PENDING,,",
        "S-004,control,2026-05-05,pending,,",
        "S-005,control,2026-05-06,no,,",
        "S-006,control,2026-05-07,yes,no,",
      ),
      TWO_ARMS,
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    // By hand: experimental 3 enrolled, 1 evaluable (1 responder), 2 pending; control 3 enrolled, 1 evaluable, 1 pending, 1 not evaluable.
    expect(r.counts).toEqual([
      { armId: 11, enrolled: 3, treated: null, evaluable: 1, responders: 1, toxicities: null, pending: 2 },
      { armId: 12, enrolled: 3, treated: null, evaluable: 1, responders: 0, toxicities: null, pending: 1 },
    ]);
    expect(r.rows.filter((x) => x.pending).map((x) => x.subjectId)).toEqual(["S-002", "S-003", "S-004"]);
    expect(r.rows.find((x) => x.subjectId === "S-002")).toMatchObject({ evaluable: false, pending: true, responder: null });
  });

  it("refuses a response recorded for a pending patient, and an unknown evaluable value, naming the line", () => {
    expectIssue(csv("S-001,experimental,2026-05-02,pending,yes,"), TWO_ARMS, { line: 2, column: "response", message: /evaluable says pending/ });
    expectIssue(csv("S-001,experimental,2026-05-02,later,,"), TWO_ARMS, { line: 2, column: "evaluable", message: /yes, no or pending/ });
  });
});
