import { describe, expect, it } from "vitest";
import { codedWords, kindName, sheetProvenance, storedReading } from "../../../src/features/repairs/reading-words.js";
import { createFormat } from "../../../shared/format.js";
import type { RepairMeasurement } from "../../../shared/schemas/repairs.js";

const fmt = createFormat({ locale: "en-US", currency: "USD" });
const reading = (kind: string, value: number | null, more: Partial<RepairMeasurement> = {}): RepairMeasurement => ({
  kind,
  position: 0,
  attempt: 1,
  value,
  unit: "",
  overRange: false,
  rawValue: String(value),
  rawUnit: null,
  conversionRule: "as recorded",
  sheet: null,
  ...more,
} as RepairMeasurement);

describe("reading words on the repair record", () => {
  it("names each kind as the catalogue does", () => {
    expect(kindName("bench_test")).toBe("Heater-plug bench test");
    expect(kindName("plug_resistance")).toBe("Heater-plug resistance");
    expect(kindName("some_new_kind")).toBe("some new kind");
  });

  it("says the coded checks in words, and nothing for a gauge reading", () => {
    expect(codedWords("bench_test", 1)).toBe("heats");
    expect(codedWords("bench_test", 0)).toBe("no heat");
    expect(codedWords("engine_state", 0)).toBe("cold");
    expect(codedWords("preheat_lamp", 1)).toBe("lit: asked to wait for preheat");
    expect(codedWords("compression", 1)).toBeNull();
  });

  it("writes the ambient temperature in the reader's unit: −10 °C is 14 °F (NIST SP 811 §B.8, t/°F = 1.8 t/°C + 32)", () => {
    expect(storedReading(reading("ambient_temperature", -10, { unit: "C" }), fmt, "C")).toBe(`${fmt.quantity("plain", -10)}\u00a0°C`);
    expect(storedReading(reading("ambient_temperature", -10, { unit: "C" }), fmt, "F")).toBe(`${fmt.quantity("plain", 14)}\u00a0°F`);
    expect(storedReading(reading("plug_resistance", null, { overRange: true }), fmt, "C")).toBe("over range");
  });

  it("says who entered the sheet's readings and when, once per entry, latest first", () => {
    const a = { by: "Ilka Sorn", at: "2025-06-02T08:15:00.000Z" };
    const b = { by: "Ilka Sorn", at: "2025-06-03T09:00:00.000Z" };
    const lines = sheetProvenance([reading("bench_test", 1, { sheet: a }), reading("bench_test", 0, { sheet: a }), reading("compression", 400, { sheet: b }), reading("compression", 410)], fmt);
    expect(lines).toEqual([`Entered on the bench sheet by Ilka Sorn on ${fmt.dateTime(b.at)}.`, `Entered on the bench sheet by Ilka Sorn on ${fmt.dateTime(a.at)}.`]);
  });
});
