import { measurementKinds } from "../../shared/catalog.js";
import { checkRange, FieldReader, mapCode } from "./fields.js";
import { MAX_LINE_NO } from "./jobs.js";
import { reject } from "./reject.js";
import { parseResistance, pressureToPsi, sniffCompressionUnit, type PressureUnit } from "./units.js";
import { formatNumber, normaliseCode, parseDecimal } from "./values.js";

const kindCodes = new Set<string>(measurementKinds.map((k) => k.code));
const kindByName = new Map<string, string>(measurementKinds.map((k) => [k.name.toUpperCase(), k.code]));

export interface MeasurementStage {
  shop_code: string;
  ro_number: string;
  line_no: number;
  kind: string;
  position: number;
  attempt: number;
  value: number | null;
  unit: string;
  over_range: boolean;
  raw_value: string;
  raw_unit: string | null;
  conversion_rule: string;
}

const PRESSURE_UNITS: Record<string, PressureUnit> = { PSI: "psi", KPA: "kPa", BAR: "bar" };

/** Canonical value of one reading with the rule applied, or a reject. Compression → psi, resistance → Ω, voltage → V. */
export function convertReading(
  kind: string,
  rawValue: string,
  rawUnit: string | null,
  profile: FieldReader["profile"],
): { value: number | null; unit: string; overRange: boolean; rule: string } {
  if (kind === "plug_resistance") {
    const text = rawUnit ? `${rawValue} ${rawUnit}` : rawValue;
    const r = parseResistance(text, profile.units.resistance === "kohm" ? "kohm" : "ohm", profile.decimalComma);
    if (r === null) reject("bad_number", `resistance "${text}" is not a reading (a number in Ω or kΩ, "42k" or "OL")`);
    if (r.ohms !== null) checkRange(r.ohms, "resistance", "Ω", 10_000_000);
    return { value: r.ohms, unit: "ohm", overRange: r.overRange, rule: r.rule };
  }
  const n = parseDecimal(rawValue, profile.decimalComma);
  if (n === null) reject("bad_number", `${kind.replace("_", " ")} "${rawValue}" is not a number`);
  if (kind === "compression") {
    let unit: PressureUnit | null;
    let rule: string;
    if (rawUnit) {
      unit = PRESSURE_UNITS[rawUnit.trim().toUpperCase()] ?? null;
      if (unit === null) reject("unknown_code", `compression unit "${rawUnit}" is not psi, kPa or bar`);
      rule = unit === "psi" ? "psi as recorded" : `${unit} → psi (NIST SP 811)`;
    } else if (profile.units.compression === "sniff") {
      if (n < 0) reject("negative_value", `compression ${formatNumber(n)} is negative`);
      unit = sniffCompressionUnit(n);
      if (unit === null) reject("absurd_value", `compression ${formatNumber(n)} has no unit and fits no range (150–700 psi, 1,000–4,800 kPa, 10–48 bar)`);
      rule = `no unit; ${formatNumber(n)} read as ${unit} by its size${unit === "psi" ? "" : " → psi (NIST SP 811)"}`;
    } else {
      unit = profile.units.compression as PressureUnit;
      rule = unit === "psi" ? "psi as recorded" : `${unit} (profile) → psi (NIST SP 811)`;
    }
    const psi = pressureToPsi(n, unit);
    checkRange(psi, "compression", "psi", 1000);
    return { value: Math.round(psi * 10000) / 10000, unit: "psi", overRange: false, rule };
  }
  if (rawUnit && rawUnit.trim().toUpperCase() !== "V") reject("unknown_code", `voltage unit "${rawUnit}" is not V`);
  checkRange(n, kind.replace("_", " "), "V", 60);
  return { value: n, unit: "V", overRange: false, rule: "V as recorded" };
}

/** One measurement row: the reading's kind, position and attempt, and its value in the canonical unit. */
export function transformMeasurement(f: FieldReader, shop: string | undefined): MeasurementStage {
  const p = f.profile;
  const rawKind = f.text("kind")!;
  const mapped = mapCode(p.codes.measurementKind, rawKind);
  const kind = kindCodes.has(mapped.toLowerCase()) ? mapped.toLowerCase() : (kindByName.get(mapped) ?? null);
  if (kind === null) reject("unknown_code", `measurement kind "${rawKind}" is not in this shop's code table or Ironledger's list`);
  const rawValue = f.text("value")!;
  const rawUnit = f.text("unit");
  const c = convertReading(kind, rawValue, rawUnit, p);
  const stage: MeasurementStage = {
    shop_code: normaliseCode(f.text("shop_code") ?? shop ?? ""),
    ro_number: normaliseCode(f.text("ro_number")!),
    line_no: f.integer("line_no", "line number", 1, MAX_LINE_NO)!,
    kind,
    // a cylinder or plug number, an attempt number: a compact engine has a handful (common practice, no source)
    position: f.integer("position", "position", 0, 99) ?? 0,
    attempt: f.integer("attempt", "attempt", 1, 99) ?? 1,
    value: c.value,
    unit: c.unit,
    over_range: c.overRange,
    raw_value: rawValue,
    raw_unit: rawUnit,
    conversion_rule: c.rule,
  };
  return stage;
}
