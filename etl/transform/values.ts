/**
 * Parsing of the text a shop system writes into numbers, engine hours and dates. The date format is a
 * property of the export profile, never guessed per row: "03/04/2024" is ambiguous, the profile decides.
 */
export type DateFormat = "iso" | "mdy" | "dmy";
export type HoursFormat = "decimal" | "h:mm";

const PLAIN_DECIMAL = /^-?\d+(\.\d+)?$/;

/** A decimal number; with `decimalComma` the comma is the decimal mark ("1234,5"). Null when not a number. */
export function parseDecimal(text: string, decimalComma: boolean): number | null {
  // the common case, a plain decimal such as "1234.5", needs no clean-up
  if (!decimalComma && PLAIN_DECIMAL.test(text)) return Number(text);
  let t = text.trim().replace(/\s+/g, "");
  if (t === "") return null;
  if (decimalComma) {
    if (t.includes(".") && t.includes(",")) t = t.replace(/\./g, "");
    t = t.replace(",", ".");
  }
  if (!/^[-+]?(\d+\.?\d*|\.\d+)$/.test(t)) return null;
  return Number(t);
}

/** Engine hours as decimals ("1234.5", or "1234,5" with a decimal comma) or as hours:minutes ("1234:30"). */
export function parseHours(text: string, format: HoursFormat, decimalComma: boolean): number | null {
  const t = text.trim();
  const hm = /^(\d+):([0-5]\d)$/.exec(t);
  if (hm) return Number(hm[1]) + Number(hm[2]) / 60;
  if (format === "h:mm" && t.includes(":")) return null;
  return parseDecimal(t, decimalComma);
}

const DAYS_IN_MONTH = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

function isoDate(y: number, m: number, d: number): string | null {
  if (y < 1900 || y > 2999 || m < 1 || m > 12 || d < 1 || d > DAYS_IN_MONTH[m - 1]) return null;
  if (m === 2 && d === 29 && !(y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0))) return null;
  return `${y}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
}

/**
 * A calendar date in the profile's format, returned as 'YYYY-MM-DD'. ISO accepts a trailing time;
 * month/day/year and day/month/year accept '/', '.' or '-' as separators and four-digit years only.
 */
export function parseDate(text: string, format: DateFormat): string | null {
  const t = text.trim();
  if (format === "iso") {
    const m = /^(\d{4})-(\d{1,2})-(\d{1,2})(?:[T ][\d:.]+Z?)?$/.exec(t);
    return m ? isoDate(Number(m[1]), Number(m[2]), Number(m[3])) : null;
  }
  const m = /^(\d{1,2})([/.-])(\d{1,2})\2(\d{4})$/.exec(t);
  if (!m) return null;
  const [a, b, y] = [Number(m[1]), Number(m[3]), Number(m[4])];
  return format === "mdy" ? isoDate(y, a, b) : isoDate(y, b, a);
}

/** Yes/no flags as shops write them. Null when not recognised. */
export function parseFlag(text: string): boolean | null {
  const t = text.trim().toLowerCase();
  if (["y", "yes", "true", "1", "x", "j", "ja", "oui", "si"].includes(t)) return true;
  if (["n", "no", "false", "0", "nein", "non", "-"].includes(t)) return false;
  return null;
}

const NOT_PLAIN = /[^\x20-\x7e]/;
/** characters that show as nothing: soft hyphen, zero-width space/joiners, word joiner, byte-order mark */
const INVISIBLE = /[\u00ad\u200b-\u200d\u2060\ufeff]/g;
/** spaces other than the plain one (no-break, thin, ideographic …) and tabs */
const ODD_SPACE = /[\t\u00a0\u1680\u2000-\u200a\u202f\u205f\u3000]/g;

/**
 * Text as a person reads it: Unicode compatibility forms folded (NFKC: full-width letters, ligatures),
 * invisible characters removed, every kind of space made a plain one. Plain ASCII passes untouched.
 */
export function plainText(text: string): string {
  if (!NOT_PLAIN.test(text)) return text;
  return text.normalize("NFKC").replace(INVISIBLE, "").replace(ODD_SPACE, " ");
}

/** Serials and part numbers: trimmed, upper-case, without '-' and spaces ("kd-lv 0012" → "KDLV0012"). */
export function normaliseIdentifier(text: string): string {
  return plainText(text).trim().toUpperCase().replace(/[-\s]+/g, "");
}

/** Codes (model, component, shop, technician): trimmed and upper-case, inner spaces kept (one plain space each). */
export function normaliseCode(text: string): string {
  const t = plainText(text).trim().toUpperCase();
  return t.includes("  ") ? t.replace(/ {2,}/g, " ") : t;
}

/** Numbers in reasons use thousands separators, as a shop manager would write them: 3,812. */
export function formatNumber(n: number, maxFractionDigits = 1): string {
  return n.toLocaleString("en-US", { maximumFractionDigits: maxFractionDigits });
}
