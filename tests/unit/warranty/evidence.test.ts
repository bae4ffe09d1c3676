import { describe, expect, it } from "vitest";
import { amountOf, interpretMeasurements, mainEngineFamily } from "../../../server/services/warranty/evidence.js";
import type { MeasurementRow } from "../../../server/db/queries/claims.js";

const m = (kind: string, position: number, attempt: number, value: number | null, raw = String(value), overRange = false): MeasurementRow => ({
  repair_line_key: "1", kind, position, attempt, value: value === null ? null : String(value), unit: "", over_range: overRange, raw_value: raw, raw_unit: null,
});

describe("interpretMeasurements(readings, faults)", () => {
  it("summarises compression per cylinder: (440+450+460)/3 = 450, lowest 300, spread (450−300)/450 = 33.3 %", () => {
    const i = interpretMeasurements(
      [m("compression", 1, 1, 440), m("compression", 1, 2, 450), m("compression", 1, 3, 460), m("compression", 2, 1, 300), m("compression", 3, 1, 440)],
      [],
    );
    expect(i.compression!.cylinders.map((c) => c.mean)).toEqual([450, 300, 440]);
    expect(i.compression!.lowest).toMatchObject({ position: 2, mean: 300 });
    expect(i.compression!.spread).toBeCloseTo(150 / 450, 10);
    expect(i.compression!.spreadVerdict).toBe("fault");
  });

  it("classes an over-range plug as open and its siblings as healthy", () => {
    const i = interpretMeasurements([m("plug_resistance", 1, 1, null, "OL", true), m("plug_resistance", 2, 1, 1.0), m("plug_resistance", 3, 1, 1.1)], []);
    expect(i.plugs.map((p) => p.verdict)).toEqual(["open", "healthy", "healthy"]);
  });

  it("reads about 0 V on the rail with an FMI 5 code as a fuse or relay fault", () => {
    const i = interpretMeasurements([m("rail_voltage", 0, 1, 0.1)], [{ repair_line_key: "1", spn: 520211, fmi: 5, meaning: null, occurrences: 1 }]);
    expect(i.rail[0]).toMatchObject({ verdict: "fault", label: "about 0 V with a fault code: suspect the fuse or relay" });
  });
});

describe("amountOf(lines) and mainEngineFamily(lines)", () => {
  it("adds parts and labour (12.10 + 30.05 + 7.85 = 50.00) and is null without any cost", () => {
    expect(amountOf([{ partsCost: 12.1, laborCost: 30.05 }, { partsCost: null, laborCost: 7.85 }])).toBe(50);
    expect(amountOf([{ partsCost: null, laborCost: null }])).toBeNull();
  });

  it("picks the most frequent engine family", () => {
    const f = (engineFamily: string) => ({ machine: { engineFamily } });
    expect(mainEngineFamily([f("K38-4H"), f("K26-4R"), f("K26-4R")])).toBe("K26-4R");
  });
});
