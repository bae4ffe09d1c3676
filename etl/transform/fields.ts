import type { Profile } from "../profiles/profile-schema.js";
import { reject } from "./reject.js";
import { formatNumber, normaliseCode, parseDate, parseDecimal, parseFlag, parseHours } from "./values.js";

/**
 * Field readers shared by the row transforms: each returns the parsed value (or null when blank) and
 * rejects the row, in words, when the text cannot be what the column says.
 */
export class FieldReader {
  constructor(
    readonly profile: Profile,
    /** 'YYYY-MM-DD': dates after it are in the future */
    readonly today: string,
    readonly row: Record<string, string | undefined>,
  ) {}

  text(col: string): string | null {
    const v = this.row[col]?.trim();
    return v ? v : null;
  }

  date(col: string, label: string): string | null {
    const t = this.text(col);
    if (t === null) return null;
    const d = parseDate(t, this.profile.dateFormat);
    if (d === null) reject("bad_date", `${label} "${t}" is not a date in this export's format (${dateFormatLabel(this.profile.dateFormat)})`);
    if (d > this.today) reject("future_date", `${label} ${d} is in the future`);
    return d;
  }

  number(col: string, label: string): number | null {
    const t = this.text(col);
    if (t === null) return null;
    const n = parseDecimal(t, this.profile.decimalComma);
    if (n === null) reject("bad_number", `${label} "${t}" is not a number`);
    return n;
  }

  hours(col: string, label: string): number | null {
    const t = this.text(col);
    if (t === null) return null;
    const n = parseHours(t, this.profile.hoursFormat, this.profile.decimalComma);
    if (n === null) reject("bad_number", `${label} "${t}" is not a number of hours`);
    return n;
  }

  /** A whole number from `min` to `max` (the column's type and any real value fit inside). */
  integer(col: string, label: string, min: number, max: number): number | null {
    const n = this.number(col, label);
    if (n === null) return null;
    if (!Number.isInteger(n) || n < min) reject("bad_number", `${label} "${this.text(col)}" is not a whole number of at least ${min}`);
    if (n > max) reject("absurd_value", `${label} ${formatNumber(n)} is beyond any plausible value (at most ${formatNumber(max)})`);
    return n;
  }

  flag(col: string, label: string): boolean | null {
    const t = this.text(col);
    if (t === null) return null;
    const f = parseFlag(t);
    if (f === null) reject("bad_number", `${label} "${t}" is neither yes nor no`);
    return f;
  }
}

/** Rejects values below zero or above a limit no real reading reaches; `unit` is shown after the number. */
export function checkRange(value: number | null, label: string, unit: string, max: number): void {
  if (value === null) return;
  const u = unit ? ` ${unit}` : "";
  if (value < 0) reject("negative_value", `${label} ${formatNumber(value, 2)}${u} is negative`);
  if (value > max) reject("absurd_value", `${label} ${formatNumber(value, 2)}${u} is beyond any plausible value (at most ${formatNumber(max)}${u})`);
}

export function dateFormatLabel(f: Profile["dateFormat"]): string {
  return f === "iso" ? "YYYY-MM-DD" : f === "mdy" ? "MM/DD/YYYY" : "DD/MM/YYYY or DD.MM.YYYY";
}

const normalisedTables = new WeakMap<Record<string, string>, Map<string, string>>();

/** Looks a shop code up in the profile's code table (case- and space-insensitive keys), else returns it upper-cased. */
export function mapCode(table: Record<string, string>, raw: string): string {
  let m = normalisedTables.get(table);
  if (!m) {
    m = new Map(Object.entries(table).map(([k, v]) => [normaliseCode(k), v]));
    normalisedTables.set(table, m);
  }
  const key = normaliseCode(raw);
  return m.get(key) ?? key;
}
