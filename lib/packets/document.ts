/**
 * The packet as data: sections of paragraphs, fact lists, tables and vector charts. Content
 * builders produce it (pure, testable), the PDF renderer draws it, and its canonical JSON is what
 * the content hash covers, so the same data always gives the same hash whatever the PDF library
 * writes into its file header.
 */
import { canonicalJson } from "@/lib/canonical-json";
import { createHash } from "node:crypto";

export type PacketAudience = "open" | "closed";

type ChartSeries = {
  name: string;
  /** line: joined points; step: horizontal step through the points; points: markers only. */
  kind: "line" | "step" | "points" | "vline";
  colour: string;
  points: Array<[number, number]>;
  dashed?: boolean;
};

export type PacketChart = {
  title: string;
  xLabel: string;
  yLabel: string;
  xRange: [number, number];
  yRange: [number, number];
  series: ChartSeries[];
};

export type PacketBlock =
  | { kind: "paragraph"; text: string; tone?: "normal" | "muted" | "caution" }
  | { kind: "facts"; rows: Array<[string, string]> }
  | { kind: "table"; caption: string; columns: string[]; rows: string[][] }
  | { kind: "chart"; chart: PacketChart };

export type PacketSection = { id: string; part: PacketAudience; title: string; blocks: PacketBlock[] };

export type PacketDocument = {
  audience: PacketAudience;
  /** Shown on the cover and in the running header. */
  title: string;
  trialCode: string;
  trialTitle: string;
  meetingLabel: string;
  caution: string;
  sections: PacketSection[];
};

/** SHA-256 (hex) of the packet's canonical content and the engine version that computed it. */
export function packetContentHash(doc: PacketDocument, engineVersion: string): string {
  return createHash("sha256").update(canonicalJson({ doc, engineVersion })).digest("hex");
}

/**
 * The built-in PDF fonts (Helvetica) encode text as WinAnsi; characters outside it would print as
 * garbage, so they are spelled out or replaced. Control characters are dropped. Markup such as
 * "<b>" stays literal text: PDF text is never interpreted.
 */
export function pdfSafeText(s: string): string {
  const spelled = s
    .replace(/≤/g, "<=")
    .replace(/≥/g, ">=")
    .replace(/≠/g, "!=")
    .replace(/θ/g, "theta")
    .replace(/δ/g, "delta")
    .replace(/α/g, "alpha")
    .replace(/−/g, "-")
    .replace(/×/g, "x")
    .replace(/[\u2009\u202f\u00a0]/g, " ");
  let out = "";
  for (const ch of spelled) {
    const c = ch.codePointAt(0) as number;
    if (c === 9 || c === 10) out += ch;
    else if (c < 32 || (c >= 127 && c < 160)) continue;
    else if (c < 256 || "€‚ƒ„…†‡ˆ‰Š‹ŒŽ‘’“”•–—˜™š›œžŸ".includes(ch)) out += ch;
    else out += "?";
  }
  return out;
}

/** Every text the document carries, in reading order (for tests and for the e-mail summary). */
export function documentText(doc: PacketDocument): string {
  const parts: string[] = [doc.title, doc.trialCode, doc.trialTitle, doc.meetingLabel, doc.caution];
  for (const s of doc.sections) {
    parts.push(s.title);
    for (const b of s.blocks) {
      if (b.kind === "paragraph") parts.push(b.text);
      else if (b.kind === "facts") for (const [k, v] of b.rows) parts.push(`${k}: ${v}`);
      else if (b.kind === "table") parts.push(b.caption, b.columns.join(" | "), ...b.rows.map((r) => r.join(" | ")));
      else parts.push(b.chart.title, ...b.chart.series.map((x) => x.name));
    }
  }
  return parts.join("\n");
}
