import { measurementKinds } from "../../shared/catalog.js";
import { checkRange, FieldReader, mapCode } from "./fields.js";
import { MAX_LINE_NO } from "./jobs.js";
import { reject } from "./reject.js";
import { fahrenheitToCelsius, parseResistance, pressureToPsi, sniffCompressionUnit, type PressureUnit } from "./units.js";
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
const TEMPERATURE_UNITS: Record<string, "C" | "F"> = { C: "C", "°C": "C", F: "F", "°F": "F" };

/**
 * Readings that are a state in words rather than a number: stored as 0/1 with the words kept as the raw value.
 * A plug's bench test "not tested" is no reading at all (the row is left out), so it is not a word here.
 */
const STATE_WORDS: Record<string, { label: string; unit: string; say: string; values: Map<string, number> }> = {
  engine_state: {
    label: "engine state", unit: "state", say: '"cold" or "warm"',
    values: new Map([["cold", 0], ["warm", 1], ["hot", 1]]),
  },
  preheat_lamp: {
    label: "wait-to-start lamp", unit: "flag", say: '"lit" or "not lit"',
    values: new Map([["lit", 1], ["on", 1], ["yes", 1], ["1", 1], ["not lit", 0], ["off", 0], ["no", 0], ["0", 0]]),
  },
  bench_test: {
    label: "bench test", unit: "flag", say: '"heats" or "no heat"',
    values: new Map([["heats", 1], ["glows", 1], ["pass", 1], ["1", 1], ["no heat", 0], ["fail", 0], ["0", 0]]),
  },
};

/**
 * Canonical value of one reading with the rule applied, or a reject. Compression → psi, resistance → Ω, voltage → V,
 * ambient temperature → °C; engine state, wait-to-start lamp and bench test → 0/1 from their words.
 */
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
  const state = STATE_WORDS[kind];
  if (state) {
    const v = state.values.get(rawValue.trim().toLowerCase().replace(/[\s_-]+/g, " "));
    if (v === undefined) reject("unknown_code", `${state.label} "${rawValue}" is not one of ${state.say}`);
    return { value: v, unit: state.unit, overRange: false, rule: `"${rawValue.trim()}" → ${v}` };
  }
  const n = parseDecimal(rawValue, profile.decimalComma);
  if (n === null) reject("bad_number", `${kind.replace(/_/g, " ")} "${rawValue}" is not a number`);
  if (kind === "ambient_temperature") {
    const u = rawUnit ? TEMPERATURE_UNITS[rawUnit.trim().toUpperCase()] : profile.units.temperature === "F" ? "F" : "C";
    if (u === undefined) reject("unknown_code", `temperature unit "${rawUnit}" is not °C or °F`);
    const c = u === "F" ? fahrenheitToCelsius(n) : n;
    // the same plausible-weather bounds as a repair line's ambient temperature (etl/transform/jobs.ts)
    if (c < -60 || c > 60) reject("absurd_value", `ambient temperature ${formatNumber(n)} °${u} is beyond any plausible weather`);
    return { value: Math.round(c * 100) / 100, unit: "C", overRange: false, rule: u === "F" ? "°F → °C (NIST SP 811)" : "°C as recorded" };
  }
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
