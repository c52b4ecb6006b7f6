/**
 * Patient-level interim data from a data-capture export: one row per patient with a subject
 * identifier, arm, enrolment date, evaluable flag, response outcome and toxicity outcome, and
 * optionally a treated flag (evaluable for toxicity).
 *
 * Two denominators: responders are counted among the patients evaluable for response; toxicities
 * among the patients treated (evaluable for toxicity). A patient is treated when the `treated`
 * cell says yes; a file without a `treated` column counts every patient enrolled by the cut-off as
 * treated (the format before the column existed). Rows enrolled after the look's data cut-off do
 * not belong to the look: they are left out and listed in the result, not refused.
 *
 * Pure code (no I/O), shared by the upload route (which re-validates on confirm and never trusts a
 * preview) and its unit tests. Parsing is done by papaparse; every row is validated with zod plus
 * the cross-row rules (duplicate subject) and the rules that need the look (arm list, cut-off date,
 * whether the design has a safety rule).
 *
 * Line numbers are those of the file as a text editor shows them (header = line 1), counted from
 * the start of each record, so a quoted field that spans lines does not shift later numbers.
 */
import type { ArmCounts } from "@/lib/domain";
import Papa from "papaparse";
import { z } from "zod";

/** Files larger than this are refused before they are read. */
export const MAX_UPLOAD_BYTES = 5 * 1024 * 1024;
/** More patients than any phase II look; guards memory and the transaction size. */
const MAX_PATIENT_ROWS = 20_000;
/** The report lists at most this many problems; the total is always given. */
const MAX_REPORTED_ISSUES = 500;

export const PATIENT_CSV_COLUMNS = ["subject_id", "arm", "enrolment_date", "evaluable", "response", "toxicity"] as const;
type PatientCsvColumn = (typeof PATIENT_CSV_COLUMNS)[number];
/** Columns a file may add; without `treated`, every patient enrolled by the cut-off counts as treated. */
const OPTIONAL_PATIENT_CSV_COLUMNS = ["treated"] as const;
type AnyColumn = PatientCsvColumn | (typeof OPTIONAL_PATIENT_CSV_COLUMNS)[number];

export type ArmRole = "single" | "experimental" | "control";
export type ArmRef = { id: number; label: string; role: ArmRole };

export type PatientCsvContext = {
  arms: ArmRef[];
  /** ISO date (YYYY-MM-DD) of the look's data cut-off. */
  cutoffDate: string;
  /** When the locked design has a safety rule, every patient needs a toxicity outcome. */
  safetyRule: boolean;
};

/** One problem: where (line, column) and what is wrong, in words a data manager can act on. */
type CsvIssue = { line: number | null; column: string | null; message: string };

export type PatientRecord = {
  subjectId: string;
  armId: number;
  enrolledOn: string;
  evaluable: boolean;
  /**
   * Will be evaluable, response not yet known at the cut-off: the evaluable cell says "pending" and
   * the response cell is empty. Counted apart (a future patient for the predictive probability), not
   * as evaluable. Always false for an evaluable or not-evaluable patient.
   */
  pending: boolean;
  /** null exactly when the patient is not evaluable (or pending). */
  responder: boolean | null;
  /** Evaluable for toxicity; null when the design has no safety rule (toxicity is not counted). */
  treated: boolean | null;
  /** null when not recorded (allowed only without a safety rule, or for a patient not treated). */
  toxicity: boolean | null;
  sourceLine: number;
};

/** treated and toxicities are numbers exactly when the design has a safety rule. */
type DerivedArmCounts = ArmCounts & { pending: number };

/** Rows enrolled after the cut-off, left out of the look: how many, and which (at most MAX_REPORTED_ISSUES listed). */
export type ExcludedRows = { count: number; cutoffDate: string; rows: Array<{ line: number; subjectId: string; enrolmentDate: string }> };

export type PatientCsvResult =
  | { ok: true; rows: PatientRecord[]; counts: DerivedArmCounts[]; rowCount: number; excluded: ExcludedRows }
  | { ok: false; issues: CsvIssue[]; issueCount: number; rowCount: number; excluded: ExcludedRows };

/** Thrown for a file that cannot be read as CSV text at all; mapped to a single file-level issue. */
export class NotCsvError extends Error {}

/**
 * Decodes uploaded bytes as UTF-8 text (a leading byte-order mark is dropped). Binary files (NUL
 * bytes) and text in another encoding are refused with a message instead of being parsed as garbage.
 */
export function decodeCsvBytes(bytes: Uint8Array): string {
  if (bytes.byteLength > MAX_UPLOAD_BYTES) throw new NotCsvError(tooLargeMessage(bytes.byteLength));
  if (bytes.byteLength === 0) throw new NotCsvError("The file is empty.");
  if (bytes.includes(0)) throw new NotCsvError("This is not a CSV file: it contains binary data. Export the data as CSV (comma-separated text) and try again.");
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new NotCsvError("This is not a CSV file in UTF-8 text. Export it as CSV UTF-8 and try again.");
  }
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

export function tooLargeMessage(bytes: number): string {
  return `The file is ${(bytes / (1024 * 1024)).toFixed(1)} MB; the limit is ${MAX_UPLOAD_BYTES / (1024 * 1024)} MB. Split the export or remove columns Cairn does not use.`;
}

const FLAG_TRUE = new Set(["yes", "y", "1", "true"]);
const FLAG_FALSE = new Set(["no", "n", "0", "false"]);
const FLAG_HINT = "use yes/no, 1/0 or true/false";
/** The evaluable cell's third value: evaluable later, response not yet known at the cut-off. */
const PENDING_VALUE = "pending";

/** A yes/no cell; empty becomes null so the cross-field rules can say what is missing. */
function flagSchema(what: string) {
  return z
    .string()
    .transform((s) => s.trim().toLowerCase())
    .refine((s) => s === "" || FLAG_TRUE.has(s) || FLAG_FALSE.has(s), { message: `${what} must be yes or no (${FLAG_HINT}).` })
    .transform((s) => (s === "" ? null : FLAG_TRUE.has(s)));
}

/** A real calendar date written YYYY-MM-DD (the only unambiguous form in an export). */
export function isIsoDate(s: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const dt = new Date(Date.UTC(y, mo - 1, d));
  return dt.getUTCFullYear() === y && dt.getUTCMonth() === mo - 1 && dt.getUTCDate() === d;
}

const rawRowSchema = z.object({
  subject_id: z
    .string()
    .trim()
    .min(1, "The subject identifier is empty.")
    .max(64, "The subject identifier is longer than 64 characters.")
    // Starting with a letter or digit also keeps exported CSVs free of spreadsheet formulas.
    .regex(/^[A-Za-z0-9][A-Za-z0-9._\-/ ]*$/, "The subject identifier may hold letters, digits, spaces and . _ - / and must start with a letter or digit."),
  arm: z.string().trim().min(1, "The arm is empty."),
  enrolment_date: z
    .string()
    .trim()
    .min(1, "The enrolment date is empty.")
    .refine(isIsoDate, { message: "The enrolment date is not a valid date written YYYY-MM-DD." }),
  evaluable: z
    .string()
    .transform((s) => s.trim().toLowerCase())
    .refine((s) => s === "" || s === PENDING_VALUE || FLAG_TRUE.has(s) || FLAG_FALSE.has(s), { message: `Evaluable must be yes, no or ${PENDING_VALUE} (${FLAG_HINT}; ${PENDING_VALUE}: the response is not yet known at the cut-off).` })
    .transform((s): boolean | "pending" | null => (s === "" ? null : s === PENDING_VALUE ? "pending" : FLAG_TRUE.has(s))),
  response: flagSchema("Response"),
  toxicity: flagSchema("Toxicity"),
  treated: flagSchema("Treated"),
});

/** Matches an arm by its label or by its role (single, experimental, control), ignoring case. */
export function resolveArm(value: string, arms: ArmRef[]): ArmRef | undefined {
  const v = value.trim().toLowerCase();
  return arms.find((a) => a.label.trim().toLowerCase() === v) ?? arms.find((a) => a.role === v);
}

function lineStarts(text: string) {
  // Returns a function from a character offset to its 1-based line, scanning forward only.
  let pos = 0;
  let line = 1;
  return (offset: number) => {
    for (; pos < offset && pos < text.length; pos++) if (text.charCodeAt(pos) === 10) line++;
    return line;
  };
}

/**
 * Parses and validates the whole file. Never throws for bad content: every problem becomes an
 * issue with its line and column. `ok` is true only when there is no issue at all, so a file with
 * one bad row writes nothing.
 */
export function parsePatientCsv(text: string, ctx: PatientCsvContext): PatientCsvResult {
  const issues: CsvIssue[] = [];
  const records: Array<{ cells: string[]; line: number }> = [];
  const lineAt = lineStarts(text);
  let prevCursor = 0;
  let tooMany = false;
  Papa.parse<string[]>(text, {
    header: false,
    skipEmptyLines: false,
    delimitersToGuess: [",", ";", "\t"],
    step: (res, parser) => {
      const line = lineAt(prevCursor);
      prevCursor = res.meta.cursor;
      const cells = res.data;
      for (const e of res.errors) {
        if (e.code === "UndetectableDelimiter") continue;
        issues.push({ line, column: null, message: csvSyntaxMessage(e.code) });
      }
      if (cells.length === 1 && cells[0].trim() === "") return; // blank line
      records.push({ cells, line });
      if (records.length > MAX_PATIENT_ROWS + 1) {
        tooMany = true;
        parser.abort();
      }
    },
  });
  if (tooMany) return fail([{ line: null, column: null, message: `The file has more than ${MAX_PATIENT_ROWS} patient rows, the most one upload may hold.` }], 0, NONE_EXCLUDED(ctx.cutoffDate));
  if (records.length === 0) return fail([{ line: null, column: null, message: "The file has no rows: it needs a header line and one line per patient." }], 0, NONE_EXCLUDED(ctx.cutoffDate));

  const [header, ...body] = records;
  const names = header.cells.map((c) => c.trim().toLowerCase());
  const headerIssues: CsvIssue[] = [];
  for (const col of [...PATIENT_CSV_COLUMNS, ...OPTIONAL_PATIENT_CSV_COLUMNS]) {
    const n = names.filter((x) => x === col).length;
    if (n === 0 && (PATIENT_CSV_COLUMNS as readonly string[]).includes(col))
      headerIssues.push({ line: header.line, column: col, message: `The column "${col}" is missing from the header line.` });
    if (n > 1) headerIssues.push({ line: header.line, column: col, message: `The column "${col}" appears ${n} times in the header line.` });
  }
  if (headerIssues.length) {
    const looksLikeText = !names.some((x) => PATIENT_CSV_COLUMNS.includes(x as PatientCsvColumn));
    if (looksLikeText)
      headerIssues.unshift({ line: header.line, column: null, message: `This does not look like a CSV export: the first line should name the columns ${PATIENT_CSV_COLUMNS.join(", ")}.` });
    return fail(headerIssues, body.length, NONE_EXCLUDED(ctx.cutoffDate));
  }
  if (body.length === 0) return fail([{ line: null, column: null, message: "The file has a header line but no patient rows." }], 0, NONE_EXCLUDED(ctx.cutoffDate));

  const all: AnyColumn[] = [...PATIENT_CSV_COLUMNS, ...OPTIONAL_PATIENT_CSV_COLUMNS];
  const index = Object.fromEntries(all.map((c) => [c, names.indexOf(c)])) as Record<AnyColumn, number>;
  const hasTreatedColumn = index.treated >= 0;
  const seen = new Map<string, number>();
  const rows: PatientRecord[] = [];
  const excluded: ExcludedRows = { count: 0, cutoffDate: ctx.cutoffDate, rows: [] };
  for (const rec of body) {
    if (rec.cells.length !== names.length) {
      issues.push({ line: rec.line, column: null, message: `The row has ${rec.cells.length} fields but the header has ${names.length}.` });
      continue;
    }
    const raw = Object.fromEntries(all.map((c) => [c, index[c] >= 0 ? (rec.cells[index[c]] ?? "") : ""]));
    // A patient enrolled after the cut-off does not belong to this look: left out, not checked, listed.
    const enrolment = raw.enrolment_date.trim();
    if (isIsoDate(enrolment) && enrolment > ctx.cutoffDate) {
      excluded.count++;
      if (excluded.rows.length < MAX_REPORTED_ISSUES) excluded.rows.push({ line: rec.line, subjectId: raw.subject_id.trim().slice(0, 64), enrolmentDate: enrolment });
      continue;
    }
    const parsed = rawRowSchema.safeParse(raw);
    if (!parsed.success) {
      for (const i of parsed.error.issues) issues.push({ line: rec.line, column: String(i.path[0] ?? ""), message: i.message });
      continue;
    }
    const r = parsed.data;
    const rowIssues: CsvIssue[] = [];
    const arm = resolveArm(r.arm, ctx.arms);
    if (!arm)
      rowIssues.push({
        line: rec.line,
        column: "arm",
        message: `Unknown arm "${r.arm}". This trial's arms are ${ctx.arms.map((a) => `"${a.label}" (${a.role})`).join(" and ")}.`,
      });
    if (r.evaluable === null) rowIssues.push({ line: rec.line, column: "evaluable", message: `The evaluable flag is empty (${FLAG_HINT}).` });
    if (r.evaluable === "pending" && r.response !== null)
      rowIssues.push({ line: rec.line, column: "response", message: `The response is recorded but evaluable says ${PENDING_VALUE}: leave response empty until it is known, or mark the patient evaluable.` });
    if (r.evaluable === false && r.response !== null)
      rowIssues.push({ line: rec.line, column: "response", message: "A response is recorded for a patient who is not evaluable: leave response empty or correct the evaluable flag." });
    if (r.evaluable === true && r.response === null)
      rowIssues.push({ line: rec.line, column: "response", message: `The patient is evaluable but the response is empty (${FLAG_HINT}).` });
    // Without a treated column every patient counts as treated (the older format).
    const treated = hasTreatedColumn ? r.treated : true;
    if (ctx.safetyRule && hasTreatedColumn && treated === null)
      rowIssues.push({ line: rec.line, column: "treated", message: `The treated flag is empty; the design has a safety rule, so say whether the patient was treated (${FLAG_HINT}).` });
    if (ctx.safetyRule && treated === true && r.toxicity === null)
      rowIssues.push({
        line: rec.line,
        column: "toxicity",
        message: hasTreatedColumn
          ? `The patient was treated but the toxicity outcome is empty; the design has a safety rule (${FLAG_HINT}).`
          : `The toxicity outcome is empty; the design has a safety rule, so every patient needs one (${FLAG_HINT}), or add a treated column and mark patients not treated with no.`,
      });
    if (ctx.safetyRule && treated === false && r.toxicity !== null)
      rowIssues.push({ line: rec.line, column: "toxicity", message: "A toxicity outcome is recorded for a patient who was not treated: leave toxicity empty or correct the treated flag." });
    const key = r.subject_id.toLowerCase();
    const first = seen.get(key);
    if (first !== undefined) rowIssues.push({ line: rec.line, column: "subject_id", message: `Subject "${r.subject_id}" already appears on line ${first}.` });
    else seen.set(key, rec.line);
    if (rowIssues.length) {
      issues.push(...rowIssues);
      continue;
    }
    rows.push({
      subjectId: r.subject_id,
      armId: arm!.id,
      enrolledOn: r.enrolment_date,
      evaluable: r.evaluable === true,
      pending: r.evaluable === "pending",
      responder: r.evaluable === true ? r.response : null,
      treated: ctx.safetyRule ? treated === true : null,
      toxicity: r.toxicity,
      sourceLine: rec.line,
    });
  }
  if (!issues.length && rows.length === 0)
    issues.push({
      line: null,
      column: "enrolment_date",
      message: `No patient in the file was enrolled on or before the data cut-off ${ctx.cutoffDate} (${excluded.count} row${excluded.count === 1 ? " is" : "s are"} after it), so the look would have no data.`,
    });
  if (issues.length) return fail(issues, body.length, excluded);
  return { ok: true, rows, counts: deriveArmCounts(rows, ctx), rowCount: body.length, excluded };
}

const NONE_EXCLUDED = (cutoffDate: string): ExcludedRows => ({ count: 0, cutoffDate, rows: [] });

function fail(issues: CsvIssue[], rowCount: number, excluded: ExcludedRows): PatientCsvResult {
  const sorted = [...issues].sort((a, b) => (a.line ?? 0) - (b.line ?? 0));
  return { ok: false, issues: sorted.slice(0, MAX_REPORTED_ISSUES), issueCount: issues.length, rowCount, excluded };
}

function csvSyntaxMessage(code: string): string {
  if (code === "MissingQuotes") return "A quoted field is not closed (a double quote is missing).";
  if (code === "InvalidQuotes") return "A field has a stray double quote; quote the whole field and double any quote inside it.";
  if (code === "TooFewFields" || code === "TooManyFields") return "The row does not have as many fields as the header.";
  return "This line cannot be read as CSV.";
}

/**
 * Per-arm counts at the cut-off: patients enrolled on or before the cut-off date. Responders are
 * counted among the patients evaluable for response; toxicities among the treated patients
 * (both null without a safety rule). Every arm of the trial gets a row, with zeros if it has no
 * patients yet.
 */
export function deriveArmCounts(rows: PatientRecord[], ctx: PatientCsvContext): DerivedArmCounts[] {
  return ctx.arms.map((arm) => {
    const mine = rows.filter((r) => r.armId === arm.id && r.enrolledOn <= ctx.cutoffDate);
    return {
      armId: arm.id,
      enrolled: mine.length,
      treated: ctx.safetyRule ? mine.filter((r) => r.treated === true).length : null,
      evaluable: mine.filter((r) => r.evaluable).length,
      pending: mine.filter((r) => r.pending).length,
      responders: mine.filter((r) => r.evaluable && r.responder === true).length,
      toxicities: ctx.safetyRule ? mine.filter((r) => r.treated === true && r.toxicity === true).length : null,
    };
  });
}
