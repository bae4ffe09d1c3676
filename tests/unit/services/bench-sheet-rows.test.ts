import { describe, expect, it } from "vitest";
import { layouts } from "../../../etl/layouts.js";
import { hoursRows, measurementRows, refusalsOf } from "../../../server/services/bench-sheet/sheet-rows.js";
import type { BenchSheet } from "../../../shared/schemas/bench-sheet.js";

// The sheet's rows follow Ironledger's generic measurements and hours layouts (etl/layouts.ts, docs/exports.md);
// a refusal's line number is the file's line (header = line 1), as the loader counts it (etl/load/load-file.ts).
const line = { shopCode: "S1", roNumber: "T-1", lineNo: 2 };
const sheet: BenchSheet = {
  readingDate: "2025-01-16",
  conditions: { ambient: { value: -3, unit: "C" }, engine: "warm", hourMeter: 1204 },
  railVoltage: null,
  preheatLamp: false,
  plugs: [
    { position: 1, resistance: { unit: "kohm", value: 1.5 }, bench: "not_tested" },
    { position: 2, resistance: { unit: "OL" }, bench: "no_heat" },
  ],
  compression: { unit: "bar", cylinders: [{ position: 3, attempts: [29.5, 30] }, { position: 4, attempts: [] }] },
};

describe("measurementRows(line, sheet)", () => {
  const rows = measurementRows(line, sheet);

  it("writes only the columns of the generic measurements layout", () => {
    for (const r of rows) expect(Object.keys(r.row).sort()).toEqual([...layouts.measurements].sort());
  });

  it("writes one row per reading; a field left empty or a plug not bench-tested writes none", () => {
    expect(rows.map((r) => `${r.row.kind}|${r.row.position}|${r.row.attempt}|${r.row.value}|${r.row.unit}`)).toEqual([
      "ambient_temperature|0|1|-3|C",
      "engine_state|0|1|warm|",
      "preheat_lamp|0|1|not lit|",
      "plug_resistance|1|1|1.5|kohm",
      "plug_resistance|2|1|OL|",
      "bench_test|2|1|no heat|",
      "compression|3|1|29.5|bar",
      "compression|3|2|30|bar",
    ]);
  });

  it("names each row's field by its place in the sheet and in words", () => {
    expect(rows[3]).toMatchObject({ field: "plugs.0.resistance", label: "Plug 1 resistance", shown: "1.5 kΩ" });
    expect(rows[7]).toMatchObject({ field: "compression.cylinders.0.attempts.1", label: "Cylinder 3 compression, attempt 2", shown: "30 bar" });
  });
});

describe("refusalsOf(rows, rejects, kind)", () => {
  const rows = measurementRows(line, sheet);
  it("maps a refused file line back to the row written there (line 2 is the first row)", () => {
    expect(refusalsOf(rows, [{ line: 9, code: "absurd_value", reason: "compression too high" }], "measurements")).toEqual([
      { field: "compression.cylinders.0.attempts.1", label: "Cylinder 3 compression, attempt 2", value: "30 bar", reason: "compression too high" },
    ]);
  });
  it("names the reading date, not the hour meter, when the date is what was refused", () => {
    const h = hoursRows("KDLV20001", sheet);
    expect(h[0]!.row).toEqual({ serial: "KDLV20001", reading_date: "2025-01-16", hours: "1204", source: "sheet" });
    expect(refusalsOf(h, [{ line: 2, code: "future_date", reason: "reading date is in the future" }], "hours")[0]).toMatchObject({ field: "readingDate" });
    expect(refusalsOf(h, [{ line: 2, code: "hour_meter_backwards", reason: "goes backwards" }], "hours")[0]).toMatchObject({ field: "conditions.hourMeter" });
  });
  it("keeps a refusal of a line it did not write, named as the whole sheet", () => {
    expect(refusalsOf(rows, [{ line: 40, code: "unreadable_row", reason: "x" }], "measurements")).toEqual([{ field: "sheet", label: "The sheet", value: "", reason: "x" }]);
  });
});
