/**
 * Validation problems as sentences a person can act on. zod's own messages ("Invalid input:
 * expected number, received NaN") are written for programmers; where a schema gives its own message
 * it is kept, otherwise the issue's code becomes a sentence. A form shows these beside each field
 * and, listed with the field's name, at its top; the JSON API sends the same summary as its error.
 * Pure, no imports: client components and lib/http use it.
 */

type IssueLike = {
  path: ReadonlyArray<PropertyKey> | string;
  message: string;
  code?: string;
  expected?: unknown;
  minimum?: unknown;
  maximum?: unknown;
  inclusive?: boolean;
  origin?: string;
  format?: string;
  keys?: string[];
};

const DEFAULT_MESSAGE = /^(Invalid input|Invalid option|Invalid|Too small|Too big|Unrecognized key|Expected|Required)/;

const KIND: Record<string, string> = { number: "a number", int: "a whole number", string: "text", boolean: "yes or no", array: "a list", date: "a date", object: "a group of fields", bigint: "a whole number" };

/** One issue as a sentence, without the field's name ("Enter a number."). */
export function issueSentence(issue: IssueLike): string {
  if (!DEFAULT_MESSAGE.test(issue.message)) return issue.message;
  const min = issue.minimum as number | undefined;
  const max = issue.maximum as number | undefined;
  switch (issue.code) {
    case "invalid_type":
      if (/received (undefined|null)/.test(issue.message)) return "Fill this in.";
      return `Enter ${KIND[String(issue.expected)] ?? "a valid value"}.`;
    case "too_small":
      if (issue.origin === "string") return min === 1 ? "Fill this in." : `Write at least ${min} characters.`;
      if (issue.origin === "array" || issue.origin === "set") return min === 1 ? "Choose at least one." : `Choose at least ${min}.`;
      return issue.inclusive === false ? `Enter a number above ${min}.` : `Enter a number of at least ${min}.`;
    case "too_big":
      if (issue.origin === "string") return `Write at most ${max} characters.`;
      if (issue.origin === "array" || issue.origin === "set") return `Choose at most ${max}.`;
      return issue.inclusive === false ? `Enter a number below ${max}.` : `Enter a number of at most ${max}.`;
    case "invalid_value":
    case "invalid_enum_value":
    case "invalid_union":
      return "Choose one of the offered options.";
    case "invalid_format":
    case "invalid_string":
      return issue.format === "email" ? "Enter an e-mail address such as name@example.org." : issue.format === "date" ? "Enter a date (year-month-day)." : "This is not in the expected form.";
    case "unrecognized_keys":
      return `Leave out ${issue.keys?.length === 1 ? "the field" : "the fields"} ${(issue.keys ?? []).join(", ")}: they are not part of this form.`;
    case "not_multiple_of":
      return "Enter a value on the allowed steps.";
    default:
      return "This value is not accepted.";
  }
}

/** "cutoffDate" → "Cutoff date", "counts.0.responders" → "Responders, row 1", "" → "The form". */
export function fieldName(path: ReadonlyArray<PropertyKey> | string, labels: Record<string, string> = {}): string {
  const key = typeof path === "string" ? path : path.map(String).join(".");
  if (labels[key]) return labels[key];
  if (!key || key === "form") return "The form";
  const parts = key.split(".");
  const rows = parts.filter((p) => /^\d+$/.test(p)).map((p) => Number(p) + 1);
  const last = [...parts].reverse().find((p) => !/^\d+$/.test(p)) ?? key;
  const words = last.replace(/_/g, " ").replace(/([a-z0-9])([A-Z])/g, "$1 $2").toLowerCase();
  const name = words[0].toUpperCase() + words.slice(1);
  return rows.length ? `${name}, row ${rows.join(".")}` : name;
}

/**
 * The sentence at the top of a form: how many fields need attention, then each as "Name: problem".
 * "Check 2 fields: Cutoff date: Fill this in. Responders: Enter a whole number."
 */
export function errorSummary(issues: IssueLike[], labels: Record<string, string> = {}): string {
  if (issues.length === 0) return "Check the form.";
  const seen = new Set<string>();
  const lines: string[] = [];
  for (const i of issues) {
    const name = fieldName(i.path, labels);
    if (seen.has(name)) continue;
    seen.add(name);
    lines.push(`${name}: ${issueSentence(i)}`);
  }
  return `Check ${lines.length === 1 ? "1 field" : `${lines.length} fields`}: ${lines.join(" ")}`;
}

/** The same summary from field errors already keyed by field ({ cutoffDate: ["Fill this in."] }). */
export function fieldErrorsSummary(fieldErrors: Record<string, string[] | string | undefined> | undefined, labels: Record<string, string> = {}): string | null {
  const entries = Object.entries(fieldErrors ?? {}).filter(([, v]) => (Array.isArray(v) ? v.length > 0 : !!v));
  if (entries.length === 0) return null;
  return errorSummary(entries.map(([k, v]) => ({ path: k, message: Array.isArray(v) ? v[0] : (v as string) })), labels);
}
