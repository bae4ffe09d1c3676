import { describe, expect, it } from "vitest";
import {
  bandOf,
  celsiusBands,
  fahrenheitBands,
  storageBands,
  storageBandsOf,
  storageBandsOfAll,
  temperatureBandLabel,
  temperatureBandOrdinal,
  temperatureBandsIn,
  translateTemperatureBands,
  unitBandOfStorage,
  type Band,
} from "../../../shared/bands.js";
import { findingKey } from "../../../shared/finding-key.js";

// The conversion the checks use is written out here, not taken from the module: t/°C = (t/°F − 32)/1.8
// (NIST SP 811, Appendix B.8, temperature entry; REFERENCE.md case J).
const fToC = (f: number): number => (f - 32) / 1.8;

/** Every tenth of a degree from −60 to +50 °C (the ETL keeps readings to 0.1 °C), plus the edges themselves. */
const readings = [
  ...Array.from({ length: 1101 }, (_, i) => Math.round((-60 + i / 10) * 10) / 10),
  ...[-20, -10, 0, 5].flatMap((c) => [c, c - 1e-9]),
  ...[0, 20, 32, 45].flatMap((f) => [fToC(f), fToC(f) - 1e-9]),
];
const containing = (bands: readonly Band[], c: number) => bands.filter((b) => (b.lo === null || c >= b.lo) && (b.hi === null || c < b.hi));

describe("temperatureBandsIn(unit)", () => {
  it("cuts °F at 0, 20, 32 and 45 °F, i.e. −160/9, −20/3, 0 and 65/9 °C (DOMAIN.md bands; NIST SP 811 B.8 conversion)", () => {
    expect(fahrenheitBands.map((b) => b.id)).toEqual(["below-0F", "0-20F", "20-32F", "32-45F", "45F-up"]);
    const edges = fahrenheitBands.slice(1).map((b) => b.lo!);
    [-160 / 9, -20 / 3, 0, 65 / 9].forEach((e, i) => expect(Math.abs(edges[i] - e)).toBeLessThanOrEqual(1e-12));
    [0, 20, 32, 45].forEach((f, i) => expect(Math.abs(edges[i] - fToC(f))).toBeLessThanOrEqual(1e-12));
  });

  it("cuts °C on round Celsius values: −20, −10, 0 and 5 °C", () => {
    expect(celsiusBands.map((b) => [b.lo, b.hi])).toEqual([[null, -20], [-20, -10], [-10, 0], [0, 5], [5, null]]);
    expect(temperatureBandsIn("C")).toBe(celsiusBands);
    expect(temperatureBandsIn("F")).toBe(fahrenheitBands);
  });

  it("puts every reading in exactly one band of each set, the storage partition included", () => {
    for (const bands of [celsiusBands, fahrenheitBands, storageBands]) {
      for (const c of readings) expect(containing(bands, c)).toHaveLength(1);
    }
  });

  it("puts a reading of exactly an edge in the band that starts there (lo inclusive, hi exclusive)", () => {
    expect([-20, -10, 0, 5].map((c) => bandOf(celsiusBands, c).id)).toEqual(["minus20-minus10C", "minus10-0C", "0-5C", "5C-up"]);
    expect([0, 20, 32, 45].map((f) => bandOf(fahrenheitBands, fToC(f)).id)).toEqual(["0-20F", "20-32F", "32-45F", "45F-up"]);
  });
});

describe("storageBands", () => {
  it("is cut at the union of both sets' edges: −20, −160/9, −10, −20/3, 0, 5, 65/9 °C", () => {
    const edges = storageBands.slice(1).map((b) => b.lo!);
    [-20, fToC(0), -10, fToC(20), 0, 5, fToC(45)].forEach((e, i) => expect(Math.abs(edges[i] - e)).toBeLessThanOrEqual(1e-12));
    expect(storageBands).toHaveLength(8);
  });

  it("refines both sets: every storage band lies in one band of each, and every reading's storage band maps to its unit band", () => {
    for (const unit of ["C", "F"] as const) {
      for (const c of readings) {
        const s = bandOf(storageBands, c).id;
        expect(unitBandOfStorage(s, unit)).toBe(bandOf(temperatureBandsIn(unit), c).id);
        expect(storageBandsOf(bandOf(temperatureBandsIn(unit), c).id)).toContain(s);
      }
      // the unit's bands share out the storage bands with none left over and none twice
      expect(temperatureBandsIn(unit).flatMap((b) => storageBandsOf(b.id)).sort()).toEqual(storageBands.map((b) => b.id).sort());
    }
  });

  it("makes 0–20 °F the storage bands from 0 °F to 20 °F across −10 °C, and −10 to 0 °C those from −10 °C across 20 °F", () => {
    expect(storageBandsOf("0-20F")).toEqual(["0F-minus10C", "minus10C-20F"]);
    expect(storageBandsOf("minus10-0C")).toEqual(["minus10C-20F", "20F-0C"]);
    expect(storageBandsOfAll(["0-20F", "minus10-0C"])).toEqual(["0F-minus10C", "minus10C-20F", "20F-0C"]);
    expect(storageBandsOf("no-such-band")).toEqual([]);
  });
});

describe("temperatureBandLabel(id, unit)", () => {
  it("shows a band in its own unit with its round edges and a real minus sign", () => {
    expect(temperatureBandLabel("minus10-0C", "C")).toBe("−10 to 0 °C");
    expect(temperatureBandLabel("below-minus20C", "C")).toBe("below −20 °C");
    expect(temperatureBandLabel("5C-up", "C")).toBe("5 °C and above");
    expect(temperatureBandLabel("0-20F", "F")).toBe("0 to 20 °F");
    expect(temperatureBandLabel("0-20F")).toBe("0 to 20 °F");
  });

  it("converts a band of the other set to one decimal (0 °F = −17.8 °C, 20 °F = −6.7 °C; −10 °C = 14 °F)", () => {
    expect(temperatureBandLabel("0-20F", "C")).toBe("−17.8 to −6.7 °C");
    expect(temperatureBandLabel("minus20-minus10C", "F")).toBe("−4.0 to 14.0 °F");
  });

  it("leaves an unknown id as it is", () => {
    expect(temperatureBandLabel("unknown", "C")).toBe("unknown");
  });
});

describe("translateTemperatureBands(ids, unit)", () => {
  it("carries a selection to the other unit's bands that overlap it, so no selected day is dropped", () => {
    expect(translateTemperatureBands(["0-20F"], "C")).toEqual(["minus20-minus10C", "minus10-0C"]);
    expect(translateTemperatureBands(["below-minus20C", "minus20-minus10C", "minus10-0C"], "F")).toEqual(["below-0F", "0-20F", "20-32F"]);
    expect(translateTemperatureBands(["5C-up"], "C")).toEqual(["5C-up"]);
  });
});

describe("findingKey(dimensions) with a temperature band", () => {
  const dims = (temperatureBand: string) => ({ component: "P", engineFamily: "all", build: "all" as const, supplierLot: "all", shop: "S1", temperatureBand, hourBand: "all" });

  it("names the band by its place in its set, coldest = 1, so a finding keeps its key in either unit", () => {
    expect(fahrenheitBands.map((b) => temperatureBandOrdinal(b.id))).toEqual([1, 2, 3, 4, 5]);
    expect(celsiusBands.map((b) => temperatureBandOrdinal(b.id))).toEqual([1, 2, 3, 4, 5]);
    expect(findingKey(dims("0-20F"))).toBe("part=P;shop=S1;temp=2");
    expect(findingKey(dims("minus20-minus10C"))).toBe(findingKey(dims("0-20F")));
    expect(findingKey(dims("unknown"))).toBe("part=P;shop=S1;temp=unknown");
  });
});
