import { describe, expect, it } from "vitest";
import {
  ambientF,
  GENERAL_COMPRESSION_LIMITS,
  interpretCompression,
  interpretPlugs,
  interpretRail,
  pressurePsi,
  resistanceOhms,
  summariseBenchSheet,
  type CompressionLimits,
} from "../../../shared/bench-sheet-summary.js";
import { cautionsAt, safetyCautionsIn } from "../../../shared/measurement-interpretation.js";
import type { BenchPlug, BenchSheet } from "../../../shared/schemas/bench-sheet.js";

const sheet = (over: Partial<BenchSheet> = {}): BenchSheet => ({
  readingDate: "2026-01-12",
  conditions: { ambient: null, engine: "cold", hourMeter: null },
  railVoltage: null,
  preheatLamp: null,
  plugs: [],
  compression: { unit: "psi", cylinders: [] },
  ...over,
});
const plug = (position: number, resistance: BenchPlug["resistance"], bench: BenchPlug["bench"] = "not_tested"): BenchPlug => ({ position, resistance, bench });
const ohm = (value: number) => ({ unit: "ohm" as const, value });
const OL = { unit: "OL" as const };
const healthyCompression = { unit: "psi" as const, cylinders: [1, 2, 3, 4].map((position) => ({ position, attempts: [450, 455, 460] })) };

describe("unit conversions of the sheet", () => {
  it("resistanceOhms(r) reads kΩ with the SI prefix kilo = 10³ (NIST SP 811, 2008, Table 5) and OL as open", () => {
    expect(resistanceOhms({ unit: "kohm", value: 42 })).toBe(42_000);
    expect(resistanceOhms(ohm(1.1))).toBe(1.1);
    expect(resistanceOhms(OL)).toBeNull();
    expect(resistanceOhms(null)).toBeUndefined();
  });

  it("pressurePsi(value, unit) converts kPa and bar with 1 psi = 6.894 757 kPa and 1 bar = 100 kPa (NIST SP 811, 2008, Appendix B.8)", () => {
    // 3,000 kPa ÷ 6.894 757 = 435.113 psi; 30 bar = 3,000 kPa; 2,000 kPa ÷ 6.894 757 = 290.075 psi
    expect(pressurePsi(3000, "kPa")).toBeCloseTo(435.113, 3);
    expect(pressurePsi(30, "bar")).toBeCloseTo(435.113, 3);
    expect(pressurePsi(2000, "kPa")).toBeCloseTo(290.075, 3);
    expect(pressurePsi(450, "psi")).toBeCloseTo(450, 10);
  });

  it("ambientF(a) converts °C with t/°F = 1.8 t/°C + 32 (NIST SP 811, 2008, Appendix B.8)", () => {
    expect(ambientF({ value: -7, unit: "C" })).toBeCloseTo(19.4, 10);
    expect(ambientF({ value: -40, unit: "C" })).toBeCloseTo(-40, 10);
    expect(ambientF({ value: 5, unit: "F" })).toBe(5);
  });
});

describe("interpretPlugs(plugs)", () => {
  // Heater plugs read about 1 Ω or less when good, tens of ohms to kΩ or OL when open: common practice, no source.
  it("calls a plug of about 1 Ω healthy and one reading tens of ohms, kΩ or OL open", () => {
    const r = interpretPlugs([plug(1, ohm(1.0)), plug(2, ohm(45)), plug(3, { unit: "kohm", value: 12 }), plug(4, OL)]);
    expect(r.map((p) => p.verdict)).toEqual(["healthy", "open", "open", "open"]);
    expect(r.map((p) => p.failed)).toEqual([false, true, true, true]);
  });

  it("fails a plug that does not heat on the bench, and names a meter and bench that disagree", () => {
    const r = interpretPlugs([plug(1, ohm(0.9), "no_heat"), plug(2, OL, "heats"), plug(3, null, "heats"), plug(4, null, "not_tested")]);
    expect(r[0]).toMatchObject({ failed: true, verdict: "healthy" });
    expect(r[0].conflict).toMatch(/does not heat/);
    expect(r[1].conflict).toMatch(/reads open but heats/);
    expect(r[2]).toMatchObject({ verdict: null, failed: false, conflict: null });
    expect(r[3]).toMatchObject({ verdict: null, failed: false, benchWords: "not bench-tested" });
  });
});

describe("interpretCompression(compression, limits)", () => {
  // About 400–500 psi is healthy for this class of engine, about 290 psi the allowable minimum: common practice, no source.
  it("gives each cylinder its mean, lowest attempt and spread over the attempts, in psi", () => {
    const r = interpretCompression({ unit: "psi", cylinders: [{ position: 1, attempts: [440, 460, 450] }, { position: 2, attempts: [400, 420, 410] }] })!;
    expect(r.cylinders[0]).toMatchObject({ mean: 450, lowestAttempt: 440, verdict: "good" });
    expect(r.cylinders[0].attemptSpread).toBeCloseTo(20 / 460, 10);
    expect(r.average).toBeCloseTo(430, 10);
    expect(r.lowest).toMatchObject({ position: 2, mean: 410 });
    expect(r.healthy).toBe(true);
  });

  it("reads gauges in bar the same as in psi (30 bar = 435.1 psi, NIST SP 811 B.8)", () => {
    const r = interpretCompression({ unit: "bar", cylinders: [{ position: 1, attempts: [30, 30, 30] }] })!;
    expect(r.cylinders[0].mean).toBeCloseTo(435.113, 3);
    expect(r.cylinders[0].verdict).toBe("good");
  });

  it("lists a cylinder under the allowable minimum of 290 psi and is not healthy", () => {
    const r = interpretCompression({ unit: "psi", cylinders: [{ position: 1, attempts: [450] }, { position: 2, attempts: [280, 285] }, { position: 3, attempts: [448] }] })!;
    expect(r.belowAllowable).toEqual([2]);
    expect(r.cylinders[1].verdict).toBe("fault");
    expect(r.healthy).toBe(false);
  });

  it("judges against a family's own figures where the maker's manual gives them", () => {
    const family: CompressionLimits = { targetMin: 430, targetMax: 480, allowableMin: 370, source: { kind: "maker-manual", enteredBy: "S1" } };
    const r = interpretCompression({ unit: "psi", cylinders: [{ position: 1, attempts: [440] }, { position: 2, attempts: [400] }, { position: 3, attempts: [360] }] }, family)!;
    expect(r.cylinders.map((c) => c.verdict)).toEqual(["good", "watch", "fault"]);
    expect(r.belowAllowable).toEqual([3]);
    expect(r.cylinders[2].band).toContain("the maker's service manual (entered by shop S1)");
  });

  it("skips cylinders without attempts and returns null when none was tested", () => {
    expect(interpretCompression({ unit: "psi", cylinders: [{ position: 1, attempts: [] }] })).toBeNull();
  });
});

describe("interpretRail(volts, lamp)", () => {
  it("reads about 12 V as supplied, under 10.5 V as weak and 0 V as no supply", () => {
    expect(interpretRail(12.3, true)).toMatchObject({ verdict: "good" });
    expect(interpretRail(12.3, true)!.lamp).toMatch(/asked for preheat/);
    expect(interpretRail(10.1, null)).toMatchObject({ verdict: "watch", lamp: null });
    expect(interpretRail(0, false)!.label).toMatch(/fuse or relay/);
    expect(interpretRail(null, true)).toBeNull();
  });
});

describe("summariseBenchSheet(sheet, options)", () => {
  const fourOpen = [plug(1, OL), plug(2, { unit: "kohm", value: 40 }), plug(3, ohm(60)), plug(4, OL)];

  it("says four open plugs with healthy compression explain the hard cold start, and rules out the engine", () => {
    const s = summariseBenchSheet(sheet({ plugs: fourOpen, compression: healthyCompression, railVoltage: 12.4, preheatLamp: true }));
    expect(s.pointsTo.map((p) => p.text)).toEqual(["All four plugs open, compression healthy: the plugs, not the engine, explain the hard cold start."]);
    expect(s.rulesOut.map((p) => p.text).join(" ")).toMatch(/rings, a valve or the head gasket/);
    expect(s.rulesOut.map((p) => p.text).join(" ")).toMatch(/fuse, relay and feed/);
    expect(s.nextSteps[0].text).toBe("Replace plugs 1, 2, 3 and 4.");
  });

  it("points at the valve when one cylinder is low, before the plugs", () => {
    const compression = { unit: "psi" as const, cylinders: [{ position: 1, attempts: [450] }, { position: 2, attempts: [455] }, { position: 3, attempts: [330, 335] }, { position: 4, attempts: [452] }] };
    const s = summariseBenchSheet(sheet({ plugs: [plug(1, ohm(1)), plug(2, ohm(1.1)), plug(3, ohm(0.9)), plug(4, ohm(1))], compression }));
    expect(s.pointsTo[0].text).toBe("Compression low on cylinder 3: look at the valve before blaming the plugs.");
    expect(s.rulesOut.map((r) => r.text)).toContain("Every plug measured reads healthy: the plugs are not the cause.");
  });

  it("sends the technician to the fuse and relay first when the rail reads 0 V", () => {
    const s = summariseBenchSheet(sheet({ railVoltage: 0, preheatLamp: false, plugs: fourOpen }));
    expect(s.pointsTo[0].text).toBe("The rail reads 0 V: check the fuse and relay before the plugs.");
    expect(s.pointsTo[1].text).toMatch(/once the rail is supplied again/);
  });

  it("gives pressures in the reader's unit when asked", () => {
    const compression = { unit: "psi" as const, cylinders: [1, 2, 3, 4].map((position) => ({ position, attempts: [280] })) };
    const s = summariseBenchSheet(sheet({ compression }), { pressure: (p) => `${(p * 6.894757).toFixed(0)} kPa` });
    // 290 psi × 6.894 757 = 1,999.48 kPa (NIST SP 811 B.8)
    expect(s.pointsTo.map((p) => p.text).join(" ")).toContain("minimum of 1999 kPa");
  });

  it("names the plug's availability and offers a block heater while it waits in a cold shop, socket cleaned first", () => {
    const cold = { ambient: { value: -12, unit: "C" as const }, engine: "cold" as const, hourMeter: 1520 };
    const s = summariseBenchSheet(sheet({ conditions: cold, plugs: fourOpen, compression: healthyCompression }), { parts: { typicalWaitDays: 6, backOrderedNow: true } });
    const steps = s.nextSteps.map((n) => n.text);
    expect(s.coldShop).toBe(true);
    expect(steps).toContain("Heater plugs: typically 6 days from order to receipt; back-ordered at your shop now — consider the interim option below.");
    expect(steps.find((t) => t.includes("block heater"))).toMatch(/^While the plugs are on their way.*clean the socket first/);
  });

  it("offers no block heater in a warm shop or when the plugs are on the shelf, and asks the parts desk when nothing is known", () => {
    const warm = { ambient: { value: 45, unit: "F" as const }, engine: "cold" as const, hourMeter: null };
    expect(summariseBenchSheet(sheet({ conditions: warm, plugs: fourOpen }), { parts: { typicalWaitDays: 6, backOrderedNow: true } }).nextSteps.some((n) => n.text.includes("block heater"))).toBe(false);
    const cold = { ambient: { value: 5, unit: "F" as const }, engine: "cold" as const, hourMeter: null };
    expect(summariseBenchSheet(sheet({ conditions: cold, plugs: fourOpen }), { parts: { typicalWaitDays: 0, backOrderedNow: false } }).nextSteps.some((n) => n.text.includes("block heater"))).toBe(false);
    const unknown = summariseBenchSheet(sheet({ conditions: cold, plugs: fourOpen })).nextSteps.map((n) => n.text);
    expect(unknown.some((t) => t.startsWith("Ask the parts desk"))).toBe(true);
    expect(unknown.some((t) => t.startsWith("If the plugs must wait"))).toBe(true);
  });

  it("names the heater plug's part number, its typical and 90th-percentile wait, and a back-order at the shop", () => {
    const cold = { ambient: { value: -12, unit: "C" as const }, engine: "cold" as const, hourMeter: null };
    const warm = { ambient: { value: 10, unit: "C" as const }, engine: "cold" as const, hourMeter: null };
    const back = { partNumber: "KW26HP410", typicalWaitDays: 3, p90WaitDays: 12, backOrderedNow: true, lines: 40 };
    const inCold = summariseBenchSheet(sheet({ conditions: cold, plugs: fourOpen }), { parts: back }).nextSteps.map((n) => n.text);
    expect(inCold[1]).toBe("Heater plugs KW26HP410: typically 3 days from order to receipt (9 orders in 10 within 12 days); back-ordered at your shop now — consider the interim option below.");
    expect(inCold[2]).toMatch(/^While the plugs are on their way, a block heater/);
    // no interim option offered in a warm shop, so none is pointed to; a median of 46.5 days reads as 47 (rounded half up)
    const inWarm = summariseBenchSheet(sheet({ conditions: warm, plugs: fourOpen }), { parts: { ...back, typicalWaitDays: 46.5, p90WaitDays: 46.5 } }).nextSteps.map((n) => n.text);
    expect(inWarm).toEqual(["Replace plugs 1, 2, 3 and 4.", "Heater plugs KW26HP410: typically 47 days from order to receipt; back-ordered at your shop now."]);
    const few = { partNumber: "KW18HP410", typicalWaitDays: null, p90WaitDays: null, backOrderedNow: false, lines: 3 };
    expect(summariseBenchSheet(sheet({ conditions: warm, plugs: fourOpen }), { parts: few }).nextSteps[1].text).toBe(
      "Heater plugs KW18HP410: too few orders in the last 12 months to say how long they take (only 3); not back-ordered at your shop now.",
    );
    const oneDay = { partNumber: "KW26HP410", typicalWaitDays: 1, p90WaitDays: 1, backOrderedNow: false, lines: 95 };
    expect(summariseBenchSheet(sheet({ conditions: warm, plugs: fourOpen }), { parts: oneDay }).nextSteps[1].text).toBe("Heater plugs KW26HP410: typically 1 day from order to receipt; not back-ordered at your shop now.");
  });

  it("says nothing before readings are entered", () => {
    const s = summariseBenchSheet(sheet({ plugs: [plug(1, null), plug(2, null)] }));
    expect([...s.pointsTo, ...s.rulesOut, ...s.nextSteps]).toEqual([]);
  });

  it("uses the generic limits of 400–500 psi and 290 psi by default", () => {
    expect(GENERAL_COMPRESSION_LIMITS).toMatchObject({ targetMin: 400, targetMax: 500, allowableMin: 290, source: { kind: "general" } });
  });
});

describe("cautionsAt(step, unit)", () => {
  it("puts the hot-tip and spark cautions beside the bench test, cranking beside compression, and the service manual last everywhere", () => {
    const all = safetyCautionsIn("F");
    expect(cautionsAt("bench", "F")).toEqual([all[0], all[1], all[5]]);
    expect(cautionsAt("compression", "C")[0]).toMatch(/injectors/);
    expect(cautionsAt("cold-start", "C")[0]).toMatch(/starting spray/);
    expect(cautionsAt("block-heater", "C")[0]).toMatch(/socket/);
    for (const step of ["rail", "resistance", "bench", "compression", "cold-start", "block-heater", "decision"] as const) {
      expect(cautionsAt(step, "C").at(-1)).toMatch(/maker's service manual/);
    }
  });
});
