import { stringify } from "csv-stringify/browser/esm/sync";
import { csvCell } from "@shared/csv-cell";

/**
 * CSV out of the browser: a table of plain values as RFC 4180 text (csv-stringify quotes), every cell through
 * the shared rule that neutralises spreadsheet formulas (shared/csv-cell.ts). Numbers are rounded to six
 * decimals first, so a chart's table does not export floating-point noise.
 */
export function toCsv(columns: readonly { key: string; label: string }[], rows: readonly Record<string, unknown>[]): string {
  const cell = (v: unknown) => csvCell(typeof v === "number" ? Math.round(v * 1e6) / 1e6 : v);
  return stringify([columns.map((c) => cell(c.label)), ...rows.map((r) => columns.map((c) => cell(r[c.key])))], { record_delimiter: "windows" });
}

/** A column of a table that is also downloaded: what the page shows, and how the CSV writes it. */
export interface CsvColumn {
  key: string;
  label: string;
  /** the values are percentages (0–100) on the page; the CSV writes them as fractions, headed "… (fraction)" */
  percent?: boolean;
  /** the CSV's header where the page's label lacks the unit */
  csvLabel?: string;
}

/**
 * A table as the product's CSVs write it: raw numbers, the unit in the header, and every proportion as a
 * fraction (0–1) headed "(fraction)", never as a percentage.
 */
export function tableCsv(columns: readonly CsvColumn[], rows: readonly Record<string, unknown>[]): string {
  const header = (c: CsvColumn) => c.csvLabel ?? (c.percent ? `${c.label.replace(/\s*(\(%\)|%)$/, "")} (fraction)` : c.label);
  const value = (c: CsvColumn, v: unknown) => (c.percent && typeof v === "number" ? v / 100 : v);
  return toCsv(
    columns.map((c) => ({ key: c.key, label: header(c) })),
    rows.map((r) => Object.fromEntries(columns.map((c) => [c.key, value(c, r[c.key])]))),
  );
}

/** Saves text as a file. Hand-written rather than file-saver: an object URL and the download attribute are all current browsers need. */
export function downloadText(filename: string, text: string, type = "text/csv;charset=utf-8"): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement("a");
  a.href = url;
  a.download = filename;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
