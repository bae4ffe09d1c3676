/** The look every PDF of Ironledger shares: the bundled font (pdfkit embeds it), the ink colours, and text the font can print. */
import { createRequire } from "node:module";
import PDFDocument from "pdfkit";

const require = createRequire(import.meta.url);
export const FONT_REGULAR = require.resolve("@fontsource/inter-tight/files/inter-tight-latin-400-normal.woff");
export const FONT_BOLD = require.resolve("@fontsource/inter-tight/files/inter-tight-latin-700-normal.woff");

export const INK = "#1d2430";
export const MUTED = "#5f6b7a";
export const ACCENT = "#1f6f78";
export const LINE = "#d6d2c6";
export const ALERT = "#a8322d";

/** The bundled font covers Latin only: spell out the few symbols it lacks. */
export const pdfText = (s: string) =>
  s.replace(/kΩ/g, "kohm").replace(/Ω/g, "ohm").replace(/≤/g, "<=").replace(/≥/g, ">=").replace(/≈/g, "about ").replace(/→/g, "->").replace(/−/g, "-");

/** A new document with the bundled fonts registered as "regular" and "bold", and its bytes once it is ended. */
export function openPdf(options: PDFKit.PDFDocumentOptions): { doc: PDFKit.PDFDocument; done: Promise<Buffer> } {
  const doc = new PDFDocument({ bufferPages: true, ...options });
  doc.registerFont("regular", FONT_REGULAR);
  doc.registerFont("bold", FONT_BOLD);
  const chunks: Buffer[] = [];
  doc.on("data", (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });
  return { doc, done };
}

/**
 * Writes a footer line on every buffered page (right-aligned, `fromBottom` points above the page's edge), then
 * ends the document and answers its bytes.
 */
export async function finishPdf(
  doc: PDFKit.PDFDocument,
  done: Promise<Buffer>,
  footer: (page: number, pages: number) => string,
  opts: { margin: number; fromBottom: number },
): Promise<Buffer> {
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    doc.font("regular").fontSize(7.5).fillColor(MUTED).text(pdfText(footer(i + 1, range.count)), opts.margin, doc.page.height - opts.fromBottom, {
      width: doc.page.width - 2 * opts.margin,
      align: "right",
      lineBreak: false,
    });
    doc.page.margins.bottom = bottom;
  }
  doc.end();
  return await done;
}
