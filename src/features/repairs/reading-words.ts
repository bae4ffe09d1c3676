import { measurementKinds } from "@shared/catalog";
import { celsiusToFahrenheit } from "@shared/bands";
import type { Format } from "@shared/format";
import type { RepairMeasurement } from "@shared/schemas/repairs";

const kindNames = new Map<string, string>(measurementKinds.map((k) => [k.code, k.name]));

/** A reading kind by its catalogue name ("Heater-plug bench test"), the code itself for a kind the catalogue lacks. */
export const kindName = (kind: string): string => kindNames.get(kind) ?? kind.replaceAll("_", " ");

/** The coded checks of a bench sheet in words: 0/1 flags and states are stored as numbers. */
export function codedWords(kind: string, value: number | null): string | null {
  if (value === null) return null;
  if (kind === "engine_state") return value === 1 ? "warm" : "cold";
  if (kind === "preheat_lamp") return value === 1 ? "lit: asked to wait for preheat" : "not lit";
  if (kind === "bench_test") return value === 1 ? "heats" : "no heat";
  return null;
}

/** A reading as the warehouse stores it, with its unit, for the audit table. */
export function storedReading(x: RepairMeasurement, fmt: Format, temperature: "C" | "F"): string {
  if (x.overRange || x.value === null) return "over range";
  const coded = codedWords(x.kind, x.value);
  if (coded) return coded;
  if (x.kind === "compression") return fmt.pressure(x.value, "psi", "psi");
  if (x.kind === "plug_resistance") return fmt.reading("resistance", x.value);
  if (x.kind.endsWith("voltage")) return fmt.reading("voltage", x.value);
  if (x.kind === "ambient_temperature")
    return temperature === "F" ? `${fmt.quantity("plain", celsiusToFahrenheit(x.value))}\u00a0°F` : `${fmt.quantity("plain", x.value)}\u00a0°C`;
  return `${fmt.quantity("plain", x.value)} ${x.unit}`;
}

/** Who entered a line's bench-sheet readings and when, in one sentence per sheet entry (latest first). */
export function sheetProvenance(ms: readonly RepairMeasurement[], fmt: Format): string[] {
  const seen = new Map<string, { by: string; at: string }>();
  for (const m of ms) if (m.sheet) seen.set(`${m.sheet.by}|${m.sheet.at}`, m.sheet);
  return [...seen.values()].sort((a, b) => b.at.localeCompare(a.at)).map((s) => `Entered on the bench sheet by ${s.by} on ${fmt.dateTime(s.at)}.`);
}
