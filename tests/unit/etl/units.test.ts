import { describe, expect, it } from "vitest";
import {
  barToKpa, barToPsi, fahrenheitToCelsius, kpaToPsi, parseResistance, PA_PER_PSI, psiToKpa, sniffCompressionUnit,
} from "../../../etl/transform/units.js";

// Source: NIST Special Publication 811 (2008), Guide for the Use of the International System of Units,
// Appendix B.8 "Factors for Units Listed Alphabetically": psi → Pa 6.894 757 E+03; bar → Pa 1.0 E+05 (exact);
// t/°C = (t/°F − 32)/1.8 (exact). Values to 7 significant figures, as printed.
const sig7 = (x: number) => Number(x.toPrecision(7));

describe("pressure conversions against NIST SP 811 Appendix B.8", () => {
  it("uses a psi factor that matches the printed 6.894 757 E+03 Pa to 7 significant figures", () => {
    expect(sig7(PA_PER_PSI)).toBe(6894.757);
  });
  for (const [psi, kpa] of [[1, 6.894757], [100, 689.4757], [30, 206.8427], [3000, 20684.27]] as const) {
    it(`converts ${psi} psi to ${kpa} kPa`, () => expect(sig7(psiToKpa(psi))).toBe(kpa));
  }
  it("converts 1 kPa to 0.1450377 psi", () => expect(sig7(kpaToPsi(1))).toBe(0.1450377));
  it("converts 2.5 bar to exactly 250 kPa", () => expect(barToKpa(2.5)).toBe(250));
  it("converts 1 bar to 14.50377 psi", () => expect(sig7(barToPsi(1))).toBe(14.50377));
  it("round-trips psi through kPa", () => expect(kpaToPsi(psiToKpa(452.5))).toBeCloseTo(452.5, 10));
});

describe("temperature conversion against NIST SP 811 Appendix B.8", () => {
  for (const [f, c] of [[212, 100], [32, 0], [-40, -40], [0, -160 / 9]] as const) {
    it(`converts ${f} °F to ${c} °C exactly`, () => expect(Math.abs(fahrenheitToCelsius(f) - c)).toBeLessThan(1e-12));
  }
  it("converts 98.6 °F to 37 °C within float rounding", () => expect(fahrenheitToCelsius(98.6)).toBeCloseTo(37, 12));
});

describe("sniffCompressionUnit", () => {
  it("reads 150–700 as psi, 1,000–4,800 as kPa and 10–48 as bar", () => {
    expect([450, 3100, 31].map(sniffCompressionUnit)).toEqual(["psi", "kPa", "bar"]);
  });
  it("returns null for values that fit no range", () => {
    expect([95, 800, 5000, 5].map(sniffCompressionUnit)).toEqual([null, null, null, null]);
  });
});

describe("parseResistance", () => {
  it("reads kΩ suffixes with the SI prefix ×10³", () => {
    expect(parseResistance("42k", "ohm", false)).toMatchObject({ ohms: 42000, overRange: false });
    expect(parseResistance("15,5 kΩ", "ohm", true)).toMatchObject({ ohms: 15500 });
  });
  it("reads OL as an open circuit with no value", () => {
    expect(parseResistance("OL", "ohm", false)).toEqual({ ohms: null, overRange: true, rule: "OL → open circuit" });
  });
  it("reads a decimal comma in an ohm reading even when the profile uses decimal points", () => {
    expect(parseResistance("1,1 Ω", "ohm", false)).toMatchObject({ ohms: 1.1 });
  });
  it("applies the profile's default unit to a bare number", () => {
    expect(parseResistance("48", "kohm", false)).toMatchObject({ ohms: 48000 });
  });
  it("returns null for text that is not a reading", () => {
    expect(parseResistance("broken", "ohm", false)).toBeNull();
    expect(parseResistance("12 furlongs", "ohm", false)).toBeNull();
  });
});
