/**
 * Writes canonical records through a mapping profile, i.e. applies a profile in reverse: canonical column →
 * the shop's header, ISO date → the shop's date format, canonical units (°C, psi, Ω, V) → the shop's units,
 * decimal point → decimal comma, decimal hours → h:mm, our codes → the shop's codes (inverse code tables),
 * and the file encoding. The ETL reads the same profile forwards.
 */
import { createHash } from "node:crypto";
import { createWriteStream } from "node:fs";
import { Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import { stringify } from "csv-stringify";
import iconv from "iconv-lite";
import type { Profile } from "../profiles/profile-schema.js";
import { cToF } from "./weather.js";

export type CanonicalValue = string | number | boolean | null | undefined;
export type CanonicalRecord = Record<string, CanonicalValue>;

/** A per-row departure from the profile: the unit a technician actually wrote (only where the profile sniffs). */
export interface RowDrift {
  compressionUnit?: "psi" | "kPa" | "bar";
}

export const PSI_PER_BAR = 14.5038;
export const KPA_PER_PSI = 6.894757;

const DATE_COLUMNS = new Set([
  "build_date", "delivery_date", "block_heater_date", "opened_date", "closed_date",
  "part_ordered_date", "part_received_date", "date", "reading_date",
]);
/** Hour columns a profile's hoursFormat applies to: engine-hour readings and labour times. */
const HOUR_COLUMNS = new Set(["delivery_hours", "hour_meter", "hours", "standard_hours", "labor_hours"]);
const TEMPERATURE_COLUMNS = new Set(["ambient_temp", "tmin", "tmax"]);
const DECIMALS: Record<string, number> = { delivery_hours: 1, hour_meter: 1, hours: 1, standard_hours: 2, labor_hours: 2, parts_cost: 2, labor_cost: 2 };
const BOOLEAN_COLUMNS = new Set(["block_heater_fitted", "back_ordered"]);
const CODE_TABLE_OF: Record<string, keyof Profile["codes"]> = {
  component_code: "component",
  model_code: "model",
  pay_type: "payType",
  kind: "measurementKind",
};

const inverseCache = new WeakMap<Profile, Record<string, Map<string, string>>>();

/** our code → the shop's code: the first shop code in the table that maps onto ours. */
function inverseCodes(profile: Profile): Record<string, Map<string, string>> {
  let inv = inverseCache.get(profile);
  if (!inv) {
    inv = {};
    for (const [table, entries] of Object.entries(profile.codes)) {
      const m = new Map<string, string>();
      for (const [theirs, ours] of Object.entries(entries)) if (!m.has(ours)) m.set(ours, theirs);
      inv[table] = m;
    }
    inverseCache.set(profile, inv);
  }
  return inv;
}

export function headerRow(profile: Profile): string[] {
  return Object.values(profile.columns);
}

export function formatDate(iso: string, format: Profile["dateFormat"]): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(iso);
  if (!m) return iso;
  const [, y, mo, d] = m;
  if (format === "mdy") return `${mo}/${d}/${y}`;
  if (format === "dmy") return `${d}/${mo}/${y}`;
  return iso;
}

export function formatNumber(value: number, decimals: number, profile: Profile): string {
  const text = value.toFixed(decimals);
  return profile.decimalComma ? text.replace(".", ",") : text;
}

/** 1234.5 → "1234:30" (minutes rounded). */
export function formatHoursMinutes(hours: number): string {
  const totalMinutes = Math.round(hours * 60);
  return `${Math.floor(totalMinutes / 60)}:${String(totalMinutes % 60).padStart(2, "0")}`;
}

function formatMeasurement(profile: Profile, record: CanonicalRecord, drift?: RowDrift): { value: string; unit: string } {
  const raw = record.value;
  const kind = String(record.kind ?? "");
  // a meter's over-range text ("OL") carries no unit
  if (typeof raw !== "number") return { value: raw == null ? "" : String(raw), unit: "" };
  if (kind === "compression") {
    const declared = profile.units.compression;
    const written = declared === "sniff" ? (drift?.compressionUnit ?? "psi") : declared;
    const unit = declared === "sniff" ? "" : declared;
    if (written === "kPa") return { value: formatNumber(raw * KPA_PER_PSI, 0, profile), unit };
    if (written === "bar") return { value: formatNumber(raw / PSI_PER_BAR, 2, profile), unit };
    return { value: formatNumber(raw, 1, profile), unit };
  }
  if (kind === "plug_resistance") {
    const declared = profile.units.resistance;
    if (declared === "kohm") return { value: formatNumber(raw / 1000, 4, profile), unit: "kohm" };
    if (declared === "suffixed") {
      return { value: raw >= 1000 ? `${Math.round(raw / 1000)}k` : formatNumber(raw, 2, profile), unit: "" };
    }
    return { value: formatNumber(raw, raw >= 1000 ? 0 : 2, profile), unit: "ohm" };
  }
  return { value: formatNumber(raw, 2, profile), unit: String(record.unit ?? "V") };
}

function formatCell(profile: Profile, column: string, value: CanonicalValue): string {
  if (value === null || value === undefined || value === "") return "";
  if (BOOLEAN_COLUMNS.has(column)) return value === true || value === "Y" ? "Y" : "N";
  if (DATE_COLUMNS.has(column)) return formatDate(String(value), profile.dateFormat);
  const table = CODE_TABLE_OF[column];
  if (table) return inverseCodes(profile)[table]?.get(String(value)) ?? String(value);
  if (typeof value !== "number") return String(value);
  // h:mm has no negative form, so a negative time (an injected fault) stays a decimal number
  if (HOUR_COLUMNS.has(column) && profile.hoursFormat === "h:mm" && value >= 0) return formatHoursMinutes(value);
  if (TEMPERATURE_COLUMNS.has(column)) {
    return formatNumber(profile.units.temperature === "F" ? cToF(value) : value, 1, profile);
  }
  const decimals = DECIMALS[column];
  if (decimals !== undefined) return formatNumber(value, decimals, profile);
  return Number.isInteger(value) ? String(value) : formatNumber(value, 2, profile);
}

/** One canonical record → the cells the shop's system writes, in the profile's column order. */
export function renderRow(profile: Profile, record: CanonicalRecord, drift?: RowDrift): string[] {
  const measurement = profile.kind === "measurements" ? formatMeasurement(profile, record, drift) : null;
  return Object.keys(profile.columns).map((column) => {
    if (measurement && column === "value") return measurement.value;
    if (measurement && column === "unit") return measurement.unit;
    return formatCell(profile, column, record[column]);
  });
}

export interface WrittenFile {
  path: string;
  rows: number;
  bytes: number;
  sha256: string;
}

export interface ProfileWriter {
  /** false when the caller should await drained() before writing more */
  write(record: CanonicalRecord, drift?: RowDrift): boolean;
  /** writes already-rendered cells (used to repeat a line exactly) */
  writeCells(cells: string[]): boolean;
  drained(): Promise<void>;
  close(): Promise<WrittenFile>;
}

/** A streaming CSV writer for one export file, in the profile's delimiter and encoding. */
export function openProfileWriter(path: string, profile: Profile): ProfileWriter {
  const stringifier = stringify({ delimiter: profile.delimiter, bom: profile.encoding === "utf8-bom" });
  const hash = createHash("sha256");
  let bytes = 0;
  let rows = 0;
  const tap = new Transform({
    transform(chunk: Buffer, _enc, done) {
      // csv-stringify emits whole records, so a chunk never splits a character
      const encoded = profile.encoding === "windows-1252" ? iconv.encode(chunk.toString("utf8"), "win1252") : chunk;
      hash.update(encoded);
      bytes += encoded.length;
      done(null, encoded);
    },
  });
  const finished = pipeline(stringifier, tap, createWriteStream(path));
  stringifier.write(headerRow(profile));
  const writeCells = (cells: string[]): boolean => {
    rows++;
    return stringifier.write(cells);
  };
  return {
    write: (record, drift) => writeCells(renderRow(profile, record, drift)),
    writeCells,
    drained: () => new Promise((resolve) => stringifier.once("drain", () => resolve())),
    async close() {
      stringifier.end();
      await finished;
      return { path, rows, bytes, sha256: hash.digest("hex") };
    },
  };
}
