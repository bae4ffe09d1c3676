/**
 * Unit conversions into the warehouse's canonical units (compression psi, resistance Ω, voltage V,
 * temperature °C). Factors follow NIST SP 811 (2008), Appendix B.8: 1 psi = 6.894 757 E+03 Pa, here taken
 * from the exact definitions (1 lb = 0.453 592 37 kg, g_n = 9.806 65 m/s², 1 in = 0.0254 m); 1 bar = 1 E+05 Pa
 * exactly; t/°C = (t/°F − 32)/1.8 exactly. kΩ is the SI prefix ×10³.
 */

/** Pascals in one pound-force per square inch, from the exact definitions of lb, g_n and inch. */
export const PA_PER_PSI = (0.45359237 * 9.80665) / (0.0254 * 0.0254);
export const PA_PER_KPA = 1e3;
export const PA_PER_BAR = 1e5;

export type PressureUnit = "psi" | "kPa" | "bar";

export function psiToKpa(psi: number): number {
  return (psi * PA_PER_PSI) / PA_PER_KPA;
}

export function kpaToPsi(kpa: number): number {
  return (kpa * PA_PER_KPA) / PA_PER_PSI;
}

export function barToPsi(bar: number): number {
  return (bar * PA_PER_BAR) / PA_PER_PSI;
}

export function barToKpa(bar: number): number {
  return (bar * PA_PER_BAR) / PA_PER_KPA;
}

export function pressureToPsi(value: number, unit: PressureUnit): number {
  if (unit === "psi") return value;
  return unit === "kPa" ? kpaToPsi(value) : barToPsi(value);
}

/** Temperature (not a difference): t/°C = (t/°F − 32)/1.8. */
export function fahrenheitToCelsius(f: number): number {
  return (f - 32) / 1.8;
}

export function celsiusToFahrenheit(c: number): number {
  return c * 1.8 + 32;
}

/**
 * Which unit an unlabelled compression reading was written in, by its magnitude [C]:
 * 150–700 → psi, 1,000–4,800 → kPa, 10–48 → bar. Anything else is ambiguous (null).
 */
export function sniffCompressionUnit(value: number): PressureUnit | null {
  if (value >= 150 && value <= 700) return "psi";
  if (value >= 1000 && value <= 4800) return "kPa";
  if (value >= 10 && value <= 48) return "bar";
  return null;
}

const KILO = new Set(["k", "K", "kΩ", "KΩ", "kohm", "kOhm", "kohms"]);
const OHM = new Set(["Ω", "ohm", "Ohm", "ohms", "R"]);

export type ResistanceReading = { ohms: number; overRange: false; rule: string } | { ohms: null; overRange: true; rule: string };

/**
 * A resistance as a meter shows it: "1.1", "1,1 Ω", "42k", "42 kΩ", "0.9 ohm", "OL" (over limit: open circuit).
 * `defaultUnit` applies when the text carries no unit. Returns null when the text is not a reading.
 */
export function parseResistance(text: string, defaultUnit: "ohm" | "kohm", decimalComma: boolean): ResistanceReading | null {
  const t = text.trim();
  if (/^(OL|O\.L\.?|OPEN|∞)$/i.test(t)) return { ohms: null, overRange: true, rule: "OL → open circuit" };
  const m = /^([-+]?\d+(?:[.,]\d+)?)\s*(\S*)$/.exec(t);
  if (!m) return null;
  const n = Number(decimalComma || !m[1].includes(".") ? m[1].replace(",", ".") : m[1]);
  if (!Number.isFinite(n)) return null;
  const suffix = m[2];
  const unit = suffix === "" ? defaultUnit : KILO.has(suffix) ? "kohm" : OHM.has(suffix) ? "ohm" : suffix === "MΩ" ? "megohm" : null;
  if (unit === null) return null;
  if (unit === "kohm") return { ohms: n * 1e3, overRange: false, rule: "kΩ ×1000 → Ω" };
  if (unit === "megohm") return { ohms: n * 1e6, overRange: false, rule: "MΩ ×1000000 → Ω" };
  return { ohms: n, overRange: false, rule: "Ω as recorded" };
}
