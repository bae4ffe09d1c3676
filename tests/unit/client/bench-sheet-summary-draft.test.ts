import { describe, expect, it } from "vitest";
import { draftToSheet, emptyDraft, parseDecimal } from "@/features/bench-sheet/draft";
import { summariseBenchSheet } from "@shared/bench-sheet-summary";
import type { BenchLine } from "@shared/schemas/bench-sheet";

const line: BenchLine = {
  id: "S1|R100|1", shopCode: "S1", roNumber: "R100", lineNo: 1, serial: "X1", modelLine: null, engineFamily: null,
  cylinders: 3, openedDate: "2026-01-10", closedDate: null, complaint: null, createdOnSheet: false, sheetReadings: 0,
};

describe("parseDecimal(typed)", () => {
  it("reads a decimal point or a decimal comma, and nothing else, as a number", () => {
    expect(parseDecimal("1.2")).toBe(1.2);
    expect(parseDecimal("1,2")).toBe(1.2);
    expect(parseDecimal(" 450 ")).toBe(450);
    expect(parseDecimal("-7")).toBe(-7);
    expect(parseDecimal("")).toBeNull();
    expect(parseDecimal("1.2.3")).toBe("invalid");
    expect(parseDecimal("OL")).toBe("invalid");
  });
});

describe("draftToSheet(draft)", () => {
  it("offers a plug and a cylinder row per cylinder of the engine family", () => {
    const d = emptyDraft(line, { temperatureUnit: "F", pressureUnit: "bar" });
    expect(d.plugs.map((p) => p.position)).toEqual([1, 2, 3]);
    expect(d.cylinders.every((c) => c.attempts.length === 3)).toBe(true);
    expect(draftToSheet(d).sheet.compression.unit).toBe("bar");
  });

  it("leaves empty attempts out and maps the API's attempt index back to the field typed into", () => {
    const d = emptyDraft(line, { temperatureUnit: "C", pressureUnit: "psi" });
    d.cylinders[1].attempts = ["", "450", "455"];
    const r = draftToSheet(d);
    expect(r.sheet.compression.cylinders[1].attempts).toEqual([450, 455]);
    expect(r.fieldOf["compression.cylinders.1.attempts.0"]).toBe("compression.cylinders.1.attempts.1");
  });

  it("sends OL as an open plug and kΩ as typed, and lists a value that is not a number by its field", () => {
    const d = emptyDraft(line, { temperatureUnit: "C", pressureUnit: "psi" });
    d.plugs[0] = { ...d.plugs[0], ol: true, value: "3" };
    d.plugs[1] = { ...d.plugs[1], value: "40", unit: "kohm" };
    d.plugs[2] = { ...d.plugs[2], value: "1..1" };
    const r = draftToSheet(d);
    expect(r.sheet.plugs[0].resistance).toEqual({ unit: "OL" });
    expect(r.sheet.plugs[1].resistance).toEqual({ unit: "kohm", value: 40 });
    expect(r.problems).toEqual([{ field: "plugs.2.resistance", message: "Plug 3 resistance: “1..1” is not a number" }]);
  });

  it("gives the summary the sheet as typed: three open plugs, one read in kΩ (40 kΩ = 40,000 Ω, NIST SP 811 Table 5)", () => {
    const d = emptyDraft(line, { temperatureUnit: "C", pressureUnit: "psi" });
    d.plugs = d.plugs.map((p) => ({ ...p, value: "40", unit: "kohm" }));
    const s = summariseBenchSheet(draftToSheet(d).sheet);
    expect(s.plugs.map((p) => p.ohms)).toEqual([40_000, 40_000, 40_000]);
    expect(s.pointsTo[0].text).toMatch(/^All three plugs open/);
  });
});
