/**
 * Spreadsheet formula injection in CSV exports. A cell that a spreadsheet reads as a formula
 * (it starts with = + - @, or a tab or carriage return that some programs strip first) can run
 * commands or send data elsewhere when a DMC member opens the export. Typed text reaches our
 * exports (trial titles, arm labels, audit entries, patient ids from uploads), so every CSV Cairn
 * writes passes each cell and header through `neutraliseCsvCell` (OWASP, "CSV Injection":
 * https://owasp.org/www-community/attacks/CSV_Injection, prefix such a cell with a single quote).
 * Quoting and doubling of embedded double quotes is the CSV writer's job (AG Grid quotes every cell).
 *
 * Pure: no DOM, no I/O; shared by every export (components/grid/data-grid.tsx).
 */

/** First characters a spreadsheet may treat as the start of a formula: OWASP's list, plus the full-width forms of = + - @. */
const FORMULA_TRIGGERS = ["=", "+", "-", "@", "\t", "\r", "\uFF1D", "\uFF0B", "\uFF0D", "\uFF20"] as const;

/** A cell that is one plain decimal number ("-3", "-0.25", "1e-4"): a spreadsheet reads it as a number, never a formula. */
const PLAIN_NUMBER = /^-?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * The text to write for one CSV cell. Text starting with a formula trigger gets a leading single
 * quote, so spreadsheets show it as text. Plain numbers are left as they are (a negative number
 * is data, not a formula): this is the one departure from OWASP's "prefix every such cell", made
 * so exported numbers stay numbers.
 */
export function neutraliseCsvCell(text: string): string {
  if (text === "" || PLAIN_NUMBER.test(text)) return text;
  return (FORMULA_TRIGGERS as readonly string[]).includes(text[0]) ? `'${text}` : text;
}

/** Minimal shapes of AG Grid's export callback parameters (kept structural: this module stays free of the grid). */
type CellParams = { value: unknown; formatValue?: (value: unknown) => string };
type HeaderParams = { column: unknown; api: { getDisplayNameForColumn(column: never, location: "csv"): string | null } };

/** The cell as the grid shows it (its value formatter applied), neutralised. */
export function exportCellText(params: CellParams): string {
  const { value } = params;
  if (value === null || value === undefined) return "";
  const shown = params.formatValue ? params.formatValue(value) : String(value);
  return neutraliseCsvCell(shown === null || shown === undefined ? "" : String(shown));
}

/** The options every CSV export passes to AG Grid's exportDataAsCsv. */
export function safeCsvExportParams(fileName: string) {
  return {
    fileName,
    processCellCallback: (p: CellParams) => exportCellText(p),
    processHeaderCallback: (p: HeaderParams) => neutraliseCsvCell(p.api.getDisplayNameForColumn(p.column as never, "csv") ?? ""),
  };
}
