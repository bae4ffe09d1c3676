import { describe, expect, it } from "vitest";
import { convertReading } from "../../../etl/transform/measurements.js";
import { RowRejected } from "../../../etl/transform/reject.js";
import { getProfile } from "../../../etl/profiles/registry.js";

// convertReading(kind, rawValue, rawUnit, profile) as the bench sheet's rows reach it: the generic measurements
// layout with a unit on every reading.
// Source: NIST Special Publication 811 (2008), Guide for the Use of the International System of Units,
// Appendix B.8: psi → Pa 6.894 757 E+03; bar → Pa 1.0 E+05 (exact); t/°C = (t/°F − 32)/1.8 (exact);
// and §4.3 / Table 5, SI prefixes: k = 10³. Values compared to 7 significant figures, as printed.
const profile = getProfile("generic-measurements");
const sig7 = (x: number | null) => Number((x ?? NaN).toPrecision(7));
const refusal = (f: () => unknown) => {
  try {
    f();
  } catch (e) {
    if (e instanceof RowRejected) return { code: e.code, reason: e.reason };
    throw e;
  }
  return null;
};

describe("convertReading(plug_resistance, …) with the meter's unit (NIST SP 811 SI prefix k = 10³)", () => {
  it("reads 1.2 kΩ as 1,200 Ω", () => {
    const r = convertReading("plug_resistance", "1.2", "kohm", profile);
    expect(r.value).toBe(1200);
    expect(r.unit).toBe("ohm");
    expect(r.rule).toBe("kΩ ×1000 → Ω");
  });
  it("reads 0.9 Ω as recorded", () => expect(convertReading("plug_resistance", "0.9", "ohm", profile).value).toBe(0.9));
  it("reads OL as over range (open circuit) with no value", () => {
    const r = convertReading("plug_resistance", "OL", null, profile);
    expect(r).toMatchObject({ value: null, overRange: true });
  });
  it("refuses a negative resistance in words", () => {
    expect(refusal(() => convertReading("plug_resistance", "-1", "ohm", profile))).toEqual({ code: "negative_value", reason: "resistance -1 Ω is negative" });
  });
});

describe("convertReading(compression, …) in the gauge's unit (NIST SP 811 Appendix B.8)", () => {
  it("reads 689.4757 kPa as 100 psi", () => expect(sig7(convertReading("compression", "689.4757", "kPa", profile).value)).toBe(100));
  // the warehouse keeps compression to 4 decimals (numeric(12,4)): 14.50377 psi is stored as 14.5038
  it("reads 1 bar as 14.50377 psi, stored to 4 decimals", () => expect(convertReading("compression", "1", "bar", profile).value).toBe(14.5038));
  it("reads 30 bar as 435.1132 psi", () => expect(sig7(convertReading("compression", "30", "bar", profile).value)).toBe(435.1132));
  it("names the rule it applied", () => expect(convertReading("compression", "2900", "kPa", profile).rule).toBe("kPa → psi (NIST SP 811)"));
  it("refuses 9,000 psi in words", () => {
    expect(refusal(() => convertReading("compression", "9000", "psi", profile))?.code).toBe("absurd_value");
  });
});

describe("convertReading(ambient_temperature, …) (NIST SP 811 Appendix B.8, t/°C = (t/°F − 32)/1.8)", () => {
  it("reads 14 °F as −10 °C", () => expect(convertReading("ambient_temperature", "14", "F", profile)).toMatchObject({ value: -10, unit: "C" }));
  it("reads −40 °F as −40 °C", () => expect(convertReading("ambient_temperature", "-40", "F", profile).value).toBe(-40));
  it("keeps −7.5 °C as recorded", () => expect(convertReading("ambient_temperature", "-7.5", "C", profile)).toMatchObject({ value: -7.5, rule: "°C as recorded" }));
  it("refuses 200 °F as beyond any weather, in words", () => {
    expect(refusal(() => convertReading("ambient_temperature", "200", "F", profile))).toEqual({
      code: "absurd_value", reason: "ambient temperature 200 °F is beyond any plausible weather",
    });
  });
  it("refuses a unit that is not a temperature", () => {
    expect(refusal(() => convertReading("ambient_temperature", "5", "K", profile))?.reason).toBe('temperature unit "K" is not °C or °F');
  });
});

describe("convertReading for readings in words (engine state, wait-to-start lamp, bench test)", () => {
  for (const [kind, words, value] of [
    ["engine_state", "cold", 0], ["engine_state", "Warm", 1], ["preheat_lamp", "lit", 1], ["preheat_lamp", "not lit", 0],
    ["bench_test", "heats", 1], ["bench_test", "no heat", 0], ["bench_test", "No_Heat", 0],
  ] as const) {
    it(`stores ${kind} "${words}" as ${value}, keeping the words as the rule`, () => {
      const r = convertReading(kind, words, null, profile);
      expect(r.value).toBe(value);
      expect(r.rule).toBe(`"${words}" → ${value}`);
    });
  }
  it("refuses a word the kind does not take, naming the ones it does", () => {
    expect(refusal(() => convertReading("bench_test", "smokes", null, profile))).toEqual({ code: "unknown_code", reason: 'bench test "smokes" is not one of "heats" or "no heat"' });
  });
});
