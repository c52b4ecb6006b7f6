/**
 * Draws a packet document as PDF with pdfkit and its built-in Helvetica (no font files, no
 * network). Charts are vector paths drawn from the document's series, which come from the same
 * computed curves the screens plot. Every page carries a running header naming the audience and a
 * footer with the caution, the packet version, its content hash and the engine version.
 */
import PDFDocument from "pdfkit";
import { pdfSafeText, type PacketBlock, type PacketChart, type PacketDocument } from "./document";

type RenderMeta = { version: number; contentHash: string; engineVersion: string; generatedAt: Date; generatedBy: string };

const INK = "#1f1d19";
const MUTED = "#5e584c";
const RULE = "#d6d2c7";
const CAUTION_INK = "#7a4705";

type Doc = InstanceType<typeof PDFDocument>;

function audienceBanner(doc: PacketDocument): string {
  return doc.audience === "closed" ? "CLOSED REPORT - DMC members and the unblinded statistician only" : "OPEN REPORT - for everyone on the trial";
}

export async function renderPacketPdf(packet: PacketDocument, meta: RenderMeta): Promise<{ pdf: Buffer; pageCount: number }> {
  const doc: Doc = new PDFDocument({
    size: "A4",
    margins: { top: 64, bottom: 70, left: 50, right: 50 },
    bufferPages: true,
    info: {
      Title: pdfSafeText(`${packet.title}: ${packet.trialCode}`),
      Author: "Cairn",
      Subject: pdfSafeText(packet.meetingLabel),
      Keywords: `cairn packet ${packet.audience} v${meta.version} sha256:${meta.contentHash}`,
      CreationDate: meta.generatedAt,
      ModDate: meta.generatedAt,
    },
  });
  const chunks: Buffer[] = [];
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("data", (c: Buffer) => chunks.push(c));
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });

  cover(doc, packet, meta);
  let part: string | null = null;
  for (const section of packet.sections) {
    if (section.part !== part) {
      doc.addPage();
      part = section.part;
    } else ensureSpace(doc, 80);
    heading(doc, section.title);
    for (const block of section.blocks) drawBlock(doc, block);
    doc.moveDown(0.8);
  }

  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    decoratePage(doc, packet, meta, i - range.start + 1, range.count);
  }
  const pageCount = range.count;
  doc.end();
  return { pdf: await done, pageCount };
}

function contentWidth(doc: Doc): number {
  return doc.page.width - doc.page.margins.left - doc.page.margins.right;
}

function bottom(doc: Doc): number {
  return doc.page.height - doc.page.margins.bottom;
}

function ensureSpace(doc: Doc, h: number): void {
  if (doc.y + h > bottom(doc)) doc.addPage();
}

function heading(doc: Doc, title: string): void {
  ensureSpace(doc, 60);
  doc.font("Helvetica-Bold").fontSize(14).fillColor(INK).text(pdfSafeText(title), doc.page.margins.left, doc.y, { width: contentWidth(doc) });
  const y = doc.y + 3;
  doc.moveTo(doc.page.margins.left, y).lineTo(doc.page.margins.left + contentWidth(doc), y).lineWidth(0.6).strokeColor(RULE).stroke();
  doc.y = y + 8;
}

function paragraph(doc: Doc, text: string, tone: "normal" | "muted" | "caution" = "normal"): void {
  const size = tone === "muted" ? 8 : 10;
  doc.font(tone === "caution" ? "Helvetica-Bold" : "Helvetica").fontSize(size).fillColor(tone === "caution" ? CAUTION_INK : tone === "muted" ? MUTED : INK);
  const safe = pdfSafeText(text);
  ensureSpace(doc, Math.min(doc.heightOfString(safe, { width: contentWidth(doc) }), 200));
  doc.text(safe, doc.page.margins.left, doc.y, { width: contentWidth(doc) });
  doc.moveDown(0.5);
}

function drawBlock(doc: Doc, b: PacketBlock): void {
  if (b.kind === "paragraph") return paragraph(doc, b.text, b.tone);
  if (b.kind === "facts") return facts(doc, b.rows);
  if (b.kind === "table") return table(doc, b.caption, b.columns, b.rows);
  return chart(doc, b.chart);
}

function facts(doc: Doc, rows: Array<[string, string]>): void {
  const left = doc.page.margins.left;
  const keyW = 170;
  const valW = contentWidth(doc) - keyW - 10;
  for (const [k, v] of rows) {
    const ks = pdfSafeText(k);
    const vs = pdfSafeText(v);
    doc.font("Helvetica").fontSize(9.5);
    const h = Math.max(doc.heightOfString(vs, { width: valW }), doc.font("Helvetica-Bold").heightOfString(ks, { width: keyW }));
    ensureSpace(doc, h + 4);
    const y = doc.y;
    doc.font("Helvetica-Bold").fillColor(MUTED).text(ks, left, y, { width: keyW });
    doc.font("Helvetica").fillColor(INK).text(vs, left + keyW + 10, y, { width: valW });
    doc.y = y + h + 4;
  }
  doc.moveDown(0.4);
}

function table(doc: Doc, caption: string, columns: string[], rows: string[][]): void {
  const left = doc.page.margins.left;
  const width = contentWidth(doc);
  const size = columns.length > 5 ? 7.5 : 8.5;
  const pad = 3;
  // Column widths in proportion to the longest cell (bounded), so short numeric columns stay narrow.
  // A header never narrower than its longest word, so no word breaks mid-way.
  const weight = columns.map((c, i) => Math.min(40, Math.max(6, c.length * 0.7, Math.max(...c.split(" ").map((w) => w.length)) + 2, ...rows.map((r) => (r[i] ?? "").length))));
  const total = weight.reduce((s, w) => s + w, 0);
  const widths = weight.map((w) => (w / total) * width);
  const rowHeight = (cells: string[], font: string) => {
    doc.font(font).fontSize(size);
    return Math.max(...cells.map((c, i) => doc.heightOfString(pdfSafeText(c ?? ""), { width: widths[i] - 2 * pad }))) + 2 * pad;
  };
  const drawRow = (cells: string[], font: string, fill: string | null) => {
    const h = rowHeight(cells, font);
    if (doc.y + h > bottom(doc)) {
      doc.addPage();
      if (font !== "Helvetica-Bold") drawRow(columns, "Helvetica-Bold", "#eeece6");
    }
    const y = doc.y;
    if (fill) doc.rect(left, y, width, h).fillColor(fill).fill();
    let x = left;
    doc.font(font).fontSize(size).fillColor(INK);
    cells.forEach((c, i) => {
      doc.text(pdfSafeText(c ?? ""), x + pad, y + pad, { width: widths[i] - 2 * pad });
      x += widths[i];
    });
    doc.moveTo(left, y + h).lineTo(left + width, y + h).lineWidth(0.4).strokeColor(RULE).stroke();
    doc.y = y + h;
  };
  ensureSpace(doc, 50);
  doc.font("Helvetica-Oblique").fontSize(8.5).fillColor(MUTED).text(pdfSafeText(caption), left, doc.y, { width });
  doc.moveDown(0.2);
  drawRow(columns, "Helvetica-Bold", "#eeece6");
  if (rows.length === 0) drawRow(columns.map((_, i) => (i === 0 ? "none" : "")), "Helvetica", null);
  for (const r of rows) drawRow(r, "Helvetica", null);
  doc.moveDown(0.6);
}

/** Round tick values: 1, 2 or 5 times a power of ten, about `count` of them. */
export function niceTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) as number;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(+v.toFixed(10));
  return out;
}

function chart(doc: Doc, c: PacketChart): void {
  const legendRows = Math.ceil(c.series.length / 2);
  const plotH = 190;
  ensureSpace(doc, plotH + 60 + legendRows * 12);
  const left = doc.page.margins.left + 40;
  const top = doc.y + 16;
  const w = contentWidth(doc) - 50;
  const [x0, x1] = c.xRange;
  const [y0, y1] = c.yRange;
  const sx = (x: number) => left + ((x - x0) / (x1 - x0 || 1)) * w;
  const sy = (y: number) => top + plotH - ((y - y0) / (y1 - y0 || 1)) * plotH;

  doc.font("Helvetica-Bold").fontSize(9.5).fillColor(INK).text(pdfSafeText(c.title), doc.page.margins.left, doc.y, { width: contentWidth(doc) });
  doc.save();
  doc.lineWidth(0.3).strokeColor(RULE);
  for (const t of niceTicks(y0, y1)) doc.moveTo(left, sy(t)).lineTo(left + w, sy(t)).stroke();
  doc.restore();
  doc.lineWidth(0.8).strokeColor(MUTED).moveTo(left, top).lineTo(left, top + plotH).lineTo(left + w, top + plotH).stroke();
  doc.font("Helvetica").fontSize(7).fillColor(MUTED);
  for (const t of niceTicks(x0, x1)) doc.text(String(t), sx(t) - 15, top + plotH + 3, { width: 30, align: "center", lineBreak: false });
  for (const t of niceTicks(y0, y1)) doc.text(String(t), left - 34, sy(t) - 3, { width: 30, align: "right", lineBreak: false });
  doc.fontSize(8).text(pdfSafeText(c.xLabel), left, top + plotH + 14, { width: w, align: "center", lineBreak: false });
  doc.save();
  doc.rotate(-90, { origin: [doc.page.margins.left, top + plotH / 2] });
  doc.text(pdfSafeText(c.yLabel), doc.page.margins.left - plotH / 2, top + plotH / 2 - 2, { width: plotH, align: "center", lineBreak: false });
  doc.restore();

  // Clip to the plot area so a series running past the range is cut at the frame.
  doc.save();
  doc.rect(left, top - 1, w + 1, plotH + 2).clip();
  for (const s of c.series) {
    doc.lineWidth(s.kind === "vline" ? 1 : 1.4).strokeColor(s.colour).fillColor(s.colour);
    if (s.dashed) doc.dash(4, { space: 3 });
    else doc.undash();
    if (s.kind === "points") {
      for (const [x, y] of s.points) doc.circle(sx(x), sy(y), 2.6).fill();
    } else if (s.kind === "vline") {
      for (const [x] of s.points) doc.moveTo(sx(x), sy(y0)).lineTo(sx(x), sy(y1)).stroke();
    } else if (s.points.length) {
      const [first, ...rest] = s.points;
      doc.moveTo(sx(first[0]), sy(first[1]));
      let prev = first;
      for (const p of rest) {
        if (s.kind === "step") doc.lineTo(sx(p[0]), sy(prev[1]));
        doc.lineTo(sx(p[0]), sy(p[1]));
        prev = p;
      }
      doc.stroke();
      if (s.points.length === 1) doc.circle(sx(first[0]), sy(first[1]), 2).fill();
    }
  }
  doc.undash();
  doc.restore();

  let ly = top + plotH + 28;
  c.series.forEach((s, i) => {
    const lx = left + (i % 2) * (w / 2);
    if (i > 0 && i % 2 === 0) ly += 12;
    doc.lineWidth(1.4).strokeColor(s.colour).fillColor(s.colour);
    if (s.kind === "points") doc.circle(lx + 8, ly + 4, 2.6).fill();
    else {
      if (s.dashed) doc.dash(3, { space: 2 });
      doc.moveTo(lx, ly + 4).lineTo(lx + 16, ly + 4).stroke();
      doc.undash();
    }
    doc.font("Helvetica").fontSize(7.5).fillColor(INK).text(pdfSafeText(s.name), lx + 22, ly, { width: w / 2 - 26, lineBreak: false });
  });
  doc.x = doc.page.margins.left;
  doc.y = ly + 20;
}

function cover(doc: Doc, p: PacketDocument, meta: RenderMeta): void {
  const left = doc.page.margins.left;
  const width = contentWidth(doc);
  doc.y = 110;
  doc.font("Helvetica").fontSize(10).fillColor(MUTED).text("Cairn - DMC meeting packet", left, doc.y, { width });
  doc.moveDown(0.4);
  doc.font("Helvetica-Bold").fontSize(22).fillColor(INK).text(pdfSafeText(p.title), { width });
  doc.moveDown(0.3);
  doc.font("Helvetica-Bold").fontSize(13).text(pdfSafeText(`${p.trialCode}: ${p.trialTitle}`), { width });
  doc.moveDown(0.3);
  doc.font("Helvetica").fontSize(11).fillColor(INK).text(pdfSafeText(p.meetingLabel), { width });
  doc.moveDown(1.2);
  doc.font("Helvetica-Bold").fontSize(11).fillColor(p.audience === "closed" ? "#7f1f47" : "#285435").text(audienceBanner(p), { width });
  doc.moveDown(1.2);
  facts(doc, [
    ["Packet version", `${meta.version} (${p.audience} part)`],
    ["Content hash (SHA-256)", meta.contentHash],
    ["Engine version", meta.engineVersion],
    ["Generated", `${meta.generatedAt.toISOString().replace("T", " ").slice(0, 19)} UTC by ${meta.generatedBy}`],
    ["Contents", p.sections.map((s) => s.title).join("; ")],
  ]);
  doc.moveDown(1);
  const y = doc.y;
  doc.font("Helvetica-Bold").fontSize(10);
  const text = pdfSafeText(`Caution. ${p.caution}`);
  const h = doc.heightOfString(text, { width: width - 20 }) + 16;
  doc.rect(left, y, width, h).fillColor("#fdf5e6").fill();
  doc.rect(left, y, width, h).lineWidth(0.8).strokeColor("#f9e3b8").stroke();
  doc.fillColor(CAUTION_INK).text(text, left + 10, y + 8, { width: width - 20 });
}

function decoratePage(doc: Doc, p: PacketDocument, meta: RenderMeta, page: number, pages: number): void {
  const left = doc.page.margins.left;
  const width = contentWidth(doc);
  const savedBottom = doc.page.margins.bottom;
  // Writing below the bottom margin would make pdfkit open a new page; lift the margin while decorating.
  doc.page.margins.bottom = 0;
  doc.font("Helvetica-Bold").fontSize(7.5).fillColor(p.audience === "closed" ? "#7f1f47" : MUTED);
  doc.text(pdfSafeText(`${p.trialCode} - ${audienceBanner(p)}`), left, 30, { width, lineBreak: false });
  const fy = doc.page.height - 58;
  doc.moveTo(left, fy - 4).lineTo(left + width, fy - 4).lineWidth(0.4).strokeColor(RULE).stroke();
  doc.font("Helvetica").fontSize(6.8).fillColor(CAUTION_INK).text(pdfSafeText(`Caution. ${p.caution}`), left, fy, { width });
  doc.fillColor(MUTED).text(
    `Packet version ${meta.version} (${p.audience}) - SHA-256 ${meta.contentHash.slice(0, 16)}... - engine ${meta.engineVersion} - page ${page} of ${pages}`,
    left,
    doc.page.height - 32,
    { width, lineBreak: false },
  );
  doc.page.margins.bottom = savedBottom;
}
