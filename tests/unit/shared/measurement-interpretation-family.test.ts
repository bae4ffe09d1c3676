import { describe, expect, it } from "vitest";
import { classifyPlug, familyCompressionBand, summariseCompression } from "../../../shared/measurement-interpretation.js";
import { thresholdSourceWords } from "../../../shared/threshold-source.js";
import { engineSpecInputSchema, engineSpecSource, familyCompressionOf, familyPlugLimitOf, specPsi, type EngineSpec } from "../../../shared/schemas/engine-specs.js";
import { familyOptions, summariseBenchSheet } from "../../../shared/bench-sheet-summary.js";
import { interpretMeasurements } from "../../../server/services/warranty/evidence.js";
import type { MeasurementRow } from "../../../server/db/queries/claims.js";
import type { BenchSheet } from "../../../shared/schemas/bench-sheet.js";

// An engine family's own figures replace the generic bands. Conversions: NIST Special Publication 811 (2008),
// Appendix B.8: 1 psi = 6.894 757 kPa and 1 bar = 100 kPa, so 2,800 kPa = 2,800 ÷ 6.894 757 = 406.106 psi and
// 28 bar is the same pressure. The generic bands (350–400 psi still fine, 0.5–2 Ω healthy) are DOMAIN.md §3's:
// common practice, no source. The family figures below are test inputs, not values of any engine.

const spec = (over: Partial<EngineSpec> = {}): EngineSpec => ({
  engineFamily: "K26-4R",
  version: 2,
  enteredUnit: "kPa",
  targetMinPsi: specPsi(3000, "kPa"),
  targetMaxPsi: specPsi(3400, "kPa"),
  allowableMinPsi: specPsi(2800, "kPa"),
  plugHealthyMaxOhms: 1.5,
  source: "engine section, compression table",
  savedBy: "Test Admin",
  savedAt: "2026-12-01T10:00:00.000Z",
  note: "first entry",
  ...over,
});

const SOURCE = "the maker's service manual, engine section, compression table (K26-4R figures, version 2, entered by Test Admin)";

describe("specPsi(value, unit)", () => {
  it("converts kPa and bar to psi with the NIST SP 811 factor", () => {
    expect(specPsi(2800, "kPa")).toBeCloseTo(406.106, 3);
    expect(specPsi(28, "bar")).toBeCloseTo(406.106, 3);
    expect(specPsi(400, "psi")).toBe(400);
  });
});

describe("familyCompressionBand(psi, figures)", () => {
  it("is good from the target's low end, watch down to the allowable minimum, fault below it", () => {
    const f = familyCompressionOf(spec());
    expect(familyCompressionBand(440, f).verdict).toBe("good"); // 440 ≥ 435.1 psi (3,000 kPa)
    expect(familyCompressionBand(420, f).verdict).toBe("watch");
    expect(familyCompressionBand(406.2, f).verdict).toBe("watch");
    expect(familyCompressionBand(406.0, f)).toEqual({ verdict: "fault", label: "below 406 psi: under the family's allowable minimum" });
  });
});

describe("summariseCompression(readings, family)", () => {
  const readings = [{ position: 1, attempts: [445] }, { position: 2, attempts: [390] }, { position: 3, attempts: [440] }];

  it("flips a cylinder the generic bands call fine to a fault when the family's minimum is above its reading", () => {
    const generic = summariseCompression(readings)!;
    // 390 psi sits in the generic 350–400 psi band: still fine
    expect(generic.cylinders[1]).toMatchObject({ verdict: "good", band: "350–400 psi: still fine" });
    expect(generic.family).toBeNull();
    const own = summariseCompression(readings, familyCompressionOf(spec()))!;
    expect(own.cylinders[1]).toMatchObject({ verdict: "fault", band: "below 406 psi: under the family's allowable minimum" });
    expect(own.lowest).toMatchObject({ position: 2, verdict: "fault" });
    // spread and pattern do not depend on the figures: (445 − 390) ÷ 445
    expect(own.spread).toBeCloseTo(55 / 445, 12);
    expect(own.pattern).toEqual(generic.pattern);
  });

  it("keeps the generic verdicts when the family has no figures", () => {
    expect(summariseCompression(readings, null)).toEqual(summariseCompression(readings));
  });
});

describe("classifyPlug(ohms, siblings, familyHealthyMax)", () => {
  it("judges against the family's healthy maximum instead of 2 Ω, and says so", () => {
    expect(classifyPlug(1.8, [1.7, 1.75])).toMatchObject({ verdict: "healthy", label: "0.5–2 Ω: healthy" });
    expect(classifyPlug(1.8, [1.7, 1.75]).familyFigure).toBeUndefined();
    expect(classifyPlug(1.8, [1.7, 1.75], 1.5)).toMatchObject({ verdict: "high", label: "above the family's healthy maximum of 1.5 Ω", familyFigure: true });
    expect(classifyPlug(1.2, [1.1, 1.15], 1.5)).toMatchObject({ verdict: "healthy", familyFigure: true });
    // open and short stay the generic judgement
    expect(classifyPlug(null, [], 1.5)).toMatchObject({ verdict: "open" });
    expect(classifyPlug(0.2, [], 1.5).familyFigure).toBeUndefined();
  });
});

describe("thresholdSourceWords(engineSpecSource(spec))", () => {
  it("names the manual's place, the family, the version and who entered the figures", () => {
    expect(thresholdSourceWords(engineSpecSource(spec()))).toBe(SOURCE);
    expect(thresholdSourceWords(engineSpecSource(spec({ source: "   " })))).toBe("the maker's service manual (K26-4R figures, version 2, entered by Test Admin)");
  });
});

describe("interpretMeasurements(readings, faults, spec): the claim packet's verdicts", () => {
  const m = (kind: string, position: number, value: number): MeasurementRow => ({
    repair_line_key: "1", kind, position, attempt: 1, value: String(value), unit: "", over_range: false, raw_value: String(value), raw_unit: null,
  });
  const rows = [m("compression", 1, 445), m("compression", 2, 390), m("compression", 3, 440), m("plug_resistance", 1, 1.8), m("plug_resistance", 2, 1.7), m("plug_resistance", 3, 1.75)];

  it("judges against general service practice without figures, and against the family's with them, naming the manual", () => {
    const generic = interpretMeasurements(rows, []);
    expect(generic.compression!.cylinders[1]).toMatchObject({ verdict: "good", source: "general service practice" });
    expect(generic.plugs[0]).toMatchObject({ verdict: "healthy", source: "general service practice" });

    const own = interpretMeasurements(rows, [], spec());
    expect(own.compression!.cylinders[1]).toMatchObject({ verdict: "fault", source: SOURCE });
    expect(own.compression!.lowest).toMatchObject({ position: 2, verdict: "fault", source: SOURCE });
    // the spread and the pattern stay on the general bands
    expect(own.compression!.spreadSource).toBe("general service practice");
    expect(own.plugs[0]).toMatchObject({ verdict: "high", source: SOURCE });
    expect(Object.keys(own.compression!)).not.toContain("family");
  });

  it("keeps the generic plug bands when the family gives no plug maximum", () => {
    const own = interpretMeasurements(rows, [], spec({ plugHealthyMaxOhms: null }));
    expect(familyPlugLimitOf(spec({ plugHealthyMaxOhms: null }))).toBeNull();
    expect(own.plugs[0]).toMatchObject({ verdict: "healthy", source: "general service practice" });
  });
});

describe("summariseBenchSheet(sheet, familyOptions(spec))", () => {
  const sheet: BenchSheet = {
    readingDate: "2026-01-12",
    conditions: { ambient: null, engine: "cold", hourMeter: null },
    railVoltage: null,
    preheatLamp: null,
    plugs: [],
    compression: { unit: "kPa", cylinders: [1, 2, 3, 4].map((position) => ({ position, attempts: [2750] })) },
  };

  it("names the family's allowable minimum and its source when every cylinder is under it", () => {
    // 2,750 kPa = 398.85 psi: fine on the generic bands (350–400 psi), under the family's 2,800 kPa minimum
    expect(summariseBenchSheet(sheet).compression!.healthy).toBe(true);
    expect(summariseBenchSheet(sheet).compression!.belowAllowable).toEqual([]);
    const s = summariseBenchSheet(sheet, familyOptions(spec()));
    expect(s.compression!.healthy).toBe(false);
    expect(s.compression!.belowAllowable).toEqual([1, 2, 3, 4]);
    expect(s.pointsTo.map((p) => p.text)).toContain(`Cylinders 1, 2, 3 and 4 are under the allowable minimum of 406 psi (${SOURCE}).`);
    expect(summariseBenchSheet(sheet).pointsTo.map((p) => p.text).join(" ")).not.toContain("maker's service manual");
  });
});

describe("engineSpecInputSchema", () => {
  const ok = { unit: "psi", targetMin: 400, targetMax: 480, allowableMin: 350, plugHealthyMaxOhms: null, source: "engine section, table 3" };

  it("takes figures in order and refuses a minimum above the target, a negative figure and a reversed range in words", () => {
    expect(engineSpecInputSchema.safeParse(ok).success).toBe(true);
    const above = engineSpecInputSchema.safeParse({ ...ok, allowableMin: 420 });
    expect(above.error?.issues[0]).toMatchObject({ path: ["allowableMin"], message: "the allowable minimum (420 psi) is above the target's low end (400 psi); the minimum must be at or below the target" });
    const negative = engineSpecInputSchema.safeParse({ ...ok, allowableMin: -5 });
    expect(negative.error?.issues.map((i) => i.message)).toContain("The allowable minimum must be above zero");
    const reversed = engineSpecInputSchema.safeParse({ ...ok, targetMax: 390 });
    expect(reversed.error?.issues.map((i) => i.message)).toContain("the target's high end (390 psi) is below its low end (400 psi)");
    // 7,000 kPa = 1,015 psi: above the 1,000 psi ceiling, a slip of the unit
    const unit = engineSpecInputSchema.safeParse({ ...ok, unit: "kPa", targetMin: 3000, targetMax: 7000, allowableMin: 2800 });
    expect(unit.error?.issues[0]?.message).toMatch(/above 1000 psi: check the unit/);
  });
});
