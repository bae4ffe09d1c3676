/** The block-heater fitting list as a printable PDF (pdfkit), cautions included; no I/O here. */
import { createFormat } from "../../../shared/format.js";
import type { FittingList } from "../../../shared/schemas/fitting-list.js";
import { ACCENT, INK, LINE, MUTED, finishPdf, openPdf, pdfText } from "../pdf-style.js";

const MARGIN = 40;

type Doc = PDFKit.PDFDocument;
const COLS: { label: string; width: number; right?: boolean }[] = [
  { label: "Shop", width: 40 },
  { label: "Serial", width: 80 },
  { label: "Model", width: 95 },
  { label: "Engine family", width: 55 },
  { label: "Delivered", width: 62 },
  { label: "Age (months)", width: 42, right: true },
  { label: "Hour meter (h)", width: 50, right: true },
  { label: "Heater-plug age (h)", width: 55, right: true },
  { label: "Why listed", width: 220 },
];

const pageWidth = (doc: Doc) => doc.page.width - 2 * MARGIN;
const bottom = (doc: Doc) => doc.page.height - MARGIN - 20;

function block(doc: Doc, label: string, text: string) {
  if (doc.y + 40 > bottom(doc)) doc.addPage();
  doc.font("bold").fontSize(10).fillColor(ACCENT).text(pdfText(label), MARGIN, doc.y);
  doc.font("regular").fontSize(8.5).fillColor(INK).text(pdfText(text), MARGIN, doc.y + 1, { width: pageWidth(doc) });
  doc.moveDown(0.5);
}

function table(doc: Doc, rows: string[][]) {
  const scale = pageWidth(doc) / COLS.reduce((s, c) => s + c.width, 0);
  const widths = COLS.map((c) => c.width * scale);
  const header = () => {
    const y = doc.y;
    doc.font("bold").fontSize(7.5).fillColor(MUTED);
    const h = Math.max(...COLS.map((c, i) => doc.heightOfString(c.label, { width: widths[i] - 4 })));
    let x = MARGIN;
    COLS.forEach((c, i) => {
      doc.text(c.label, x + 2, y, { width: widths[i] - 4, align: c.right ? "right" : "left" });
      x += widths[i];
    });
    doc.y = y + h + 2;
    doc.moveTo(MARGIN, doc.y).lineTo(MARGIN + pageWidth(doc), doc.y).lineWidth(0.5).strokeColor(LINE).stroke();
    doc.y += 3;
  };
  header();
  for (const row of rows) {
    doc.font("regular").fontSize(8).fillColor(INK);
    const h = Math.max(...row.map((cell, i) => doc.heightOfString(pdfText(cell), { width: widths[i] - 4 }))) + 3;
    if (doc.y + h > bottom(doc)) {
      doc.addPage();
      header();
      doc.font("regular").fontSize(8).fillColor(INK);
    }
    const y = doc.y;
    let x = MARGIN;
    row.forEach((cell, i) => {
      doc.text(pdfText(cell), x + 2, y, { width: widths[i] - 4, align: COLS[i].right ? "right" : "left" });
      x += widths[i];
    });
    doc.y = y + h;
  }
  doc.x = MARGIN;
}

/**
 * The fitting list on A4 landscape: the rules it follows, the block-heater cautions before the table (they apply
 * to every row), the machines in the list's order, and a footer with the list's date and page numbers.
 */
export async function renderFittingListPdf(list: FittingList, locale = "en-US"): Promise<Buffer> {
  const f = createFormat({ locale, currency: "USD" });
  const { doc, done } = openPdf({ size: "A4", layout: "landscape", margin: MARGIN, info: { Title: "Block-heater fitting list", Author: "Ironledger" } });

  doc.font("bold").fontSize(9).fillColor(ACCENT).text("IRONLEDGER · WINTER READINESS", MARGIN, MARGIN);
  doc.font("bold").fontSize(18).fillColor(INK).text("Block-heater fitting list", MARGIN, doc.y + 2);
  const shops = list.coldShops.map((s) => `${s.code} ${s.name}`).join(", ") || "none";
  doc.font("regular").fontSize(9.5).fillColor(MUTED)
    .text(pdfText(`Data to ${f.date(list.asOf)} · cold shops: ${shops} · ${f.count(list.rows.length)} ${list.rows.length === 1 ? "machine" : "machines"} without a block heater`), MARGIN, doc.y + 2, { width: pageWidth(doc) });
  doc.moveDown(0.8);
  block(doc, "Which shops", list.coldRule);
  block(doc, "Order", list.orderRule);
  block(doc, "Safety cautions", list.cautions.map((c) => `• ${c}`).join("\n"));
  doc.moveDown(0.3);

  if (list.rows.length === 0) block(doc, "No machines to list", "Every machine in service at these shops has a block heater, or none of the shops is cold.");
  else
    table(
      doc,
      list.rows.map((r) => [
        r.shopCode, r.serial, r.modelLine, r.engineFamily, f.date(r.deliveryDate), f.count(r.ageMonths), f.count(r.hourMeter), f.count(r.coldStartPartHours), r.why,
      ]),
    );

  return finishPdf(
    doc,
    done,
    (page, pages) => `Block-heater fitting list · data to ${f.date(list.asOf)} · follow the maker's service manual and local electrical codes · page ${page} of ${pages}`,
    { margin: MARGIN, fromBottom: 26 },
  );
}
