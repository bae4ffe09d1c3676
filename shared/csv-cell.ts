/**
 * The one rule for CSV cells Ironledger writes (server downloads and client exports alike).
 *
 * A spreadsheet reads a cell that starts with = + - @, a tab or a carriage return as a formula; such a cell
 * gets a leading apostrophe so it shows as typed and nothing runs (OWASP, "CSV Injection"). A plain number
 * written as text ("-12.5", a temperature) is left alone: it is not a formula and must stay a number.
 * Quoting of commas, quotes and line breaks is left to csv-stringify (RFC 4180).
 */
const FORMULA_START = /^[=+\-@\t\r]/;
const PLAIN_NUMBER = /^-?\d+(\.\d+)?$/;

export function neutraliseCell(value: string): string {
  return FORMULA_START.test(value) && !PLAIN_NUMBER.test(value) ? `'${value}` : value;
}

/** A value of any plain type as a cell: empty for null/undefined, numbers as written, strings neutralised. */
export function csvCell(value: unknown): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  return neutraliseCell(String(value));
}
