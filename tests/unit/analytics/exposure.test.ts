import { describe, expect, it } from "vitest";
import {
  bandRates,
  cleanHourMeter,
  dayNumber,
  expectedFailures,
  exposureByHourBand,
  failureDayTmin,
  hoursAtDate,
  hoursInBands,
  lastValidHours,
  type HourMeterReading,
} from "../../../server/analytics/exposure.js";
import { bandOf, fahrenheitBands as temperatureBands } from "../../../shared/bands.js";
import { expectNear } from "./fixtures/tolerance.js";

describe("hoursInBands(entryHours, exitHours)", () => {
  it("splits an observed span 300–2,500 h into 200 + 500 + 1,000 + 500 h (DOMAIN.md exposure overlap; arithmetic written out)", () => {
    expect(hoursInBands(300, 2500).map((b) => [b.band, b.hours])).toEqual([
      ["0-500", 200],
      ["500-1k", 500],
      ["1k-2k", 1000],
      ["2k-3k", 500],
      ["3k-4k", 0],
      ["4k-6k", 0],
      ["6k+", 0],
    ]);
  });

  it("counts hours past 6,000 in the open top band (DOMAIN.md hour bands)", () => {
    expect(hoursInBands(5500, 7250).map((b) => b.hours)).toEqual([0, 0, 0, 0, 0, 500, 1250]);
  });

  it("rejects an exit before the entry (common practice, no source)", () => {
    expect(() => hoursInBands(800, 700)).toThrow(RangeError);
  });
});

describe("exposureByHourBand(machines)", () => {
  it("sums each machine's overlap per band (DOMAIN.md exposure; arithmetic written out)", () => {
    // 0–700 h gives 500 + 200; 450–1,100 h gives 50 + 500 + 100.
    const rows = exposureByHourBand([
      { entryHours: 0, exitHours: 700 },
      { entryHours: 450, exitHours: 1100 },
    ]);
    expect(rows.slice(0, 3).map((r) => r.hours)).toEqual([550, 700, 100]);
  });
});

// The bands themselves are defined in shared/bands.ts; these checks pin the analytics' use of them to the
// conversion the ETL applies, t/°C = (t/°F − 32)/1.8 (NIST SP 811, REFERENCE case J).
describe("bandOf(fahrenheitBands, tminCelsius) for ETL-converted readings", () => {
  const fToC = (f: number): number => (f - 32) / 1.8;

  it("puts a reading of exactly 0, 20, 32 or 45 °F in the band that starts there (DOMAIN.md: <0, 0–20, 20–32, 32–45, ≥45 °F)", () => {
    expect([0, 20, 32, 45].map((f) => bandOf(temperatureBands, fToC(f)).id)).toEqual(["0-20F", "20-32F", "32-45F", "45F-up"]);
  });

  it("puts readings just below each edge in the band below (DOMAIN.md temperature bands)", () => {
    expect([-0.1, 19.9, 31.9, 44.9].map((f) => bandOf(temperatureBands, fToC(f)).id)).toEqual([
      "below-0F",
      "0-20F",
      "20-32F",
      "32-45F",
    ]);
  });

  it("has edges at −160/9, −20/3, 0 and 65/9 °C (REFERENCE case J: 0 °F = −160/9 °C exactly)", () => {
    const edges = temperatureBands.slice(1).map((b) => b.lo!);
    [-160 / 9, -20 / 3, 0, 65 / 9].forEach((edge, i) => expect(Math.abs(edges[i] - edge)).toBeLessThanOrEqual(1e-12));
  });
});

describe("failureDayTmin(tminDay, tminDayBefore, morningRule)", () => {
  it("takes the colder of the day and the day before only with the morning rule (DOMAIN.md option)", () => {
    expect(failureDayTmin(-2, -11, true)).toBe(-11);
    expect(failureDayTmin(-2, -11, false)).toBe(-2);
    expect(failureDayTmin(-2, null, true)).toBe(-2);
  });
});

describe("bandRates(rows, per)", () => {
  it("gives 0.56 per 1,000 h, 95 % [0.225149, 1.153814] for 7 failures in 12,500 h (library cross-check (R poisson.test / SciPy), per REFERENCE.md case E)", () => {
    const [row, empty] = bandRates([
      { band: "1k-2k", failures: 7, exposure: 12_500 },
      { band: "6k+", failures: 0, exposure: 0 },
    ]);
    expectNear(row.rate!.rate, 0.56, 1e-12);
    expectNear(row.rate!.lower, 0.225149, 1e-6, 6);
    expectNear(row.rate!.upper, 1.153814, 1e-6, 6);
    expect(empty.rate).toBeNull();
  });
});

describe("expectedFailures(cellExposure, reference)", () => {
  it("sums cell exposure × reference rate over bands (indirect standardisation; arithmetic written out)", () => {
    // 1,000 h × 10/10,000 + 500 h × 30/5,000 = 1 + 3 = 4 expected failures.
    const reference = [
      { band: "0-500", failures: 10, exposure: 10_000 },
      { band: "500-1k", failures: 30, exposure: 5_000 },
    ];
    expect(expectedFailures({ "0-500": 1000, "500-1k": 500 }, reference)).toBeCloseTo(4, 12);
  });

  it("refuses a band the reference has no exposure in (common practice, no source)", () => {
    expect(() => expectedFailures({ "6k+": 10 }, [{ band: "6k+", failures: 0, exposure: 0 }])).toThrow(RangeError);
  });
});

describe("cleanHourMeter(readings)", () => {
  const statuses = (readings: HourMeterReading[], asOf?: string): string[] =>
    cleanHourMeter(readings, { asOf }).map((r) => `${r.date} ${r.status} ${r.machineHours}`);

  it("sorts by date and invalidates a backward move of more than 2 h, keeping a smaller one at the previous value (DOMAIN.md cleaning rules)", () => {
    expect(
      statuses([
        { date: "2023-03-01", hours: 120 },
        { date: "2023-01-10", hours: 100 },
        { date: "2023-03-20", hours: 118.5 }, // 1.5 h back: tolerated, held at 120
        { date: "2023-04-02", hours: 112 }, // 8 h back: invalid
        { date: "2023-04-20", hours: 150 },
      ]),
    ).toEqual([
      "2023-01-10 valid 100",
      "2023-03-01 valid 120",
      "2023-03-20 small-backwards 120",
      "2023-04-02 backwards null",
      "2023-04-20 valid 150",
    ]);
  });

  it("invalidates a rise of more than 24 h per calendar day, such as a decimal shift 41.25 → 4125 (DOMAIN.md cleaning rules and bad rows)", () => {
    // 40 → 4125 in 5 days is 817 h/day; 40 → 52 over 6 days is 2 h/day.
    expect(
      statuses([
        { date: "2024-05-01", hours: 40 },
        { date: "2024-05-06", hours: 4125 },
        { date: "2024-05-07", hours: 52 },
      ]),
    ).toEqual(["2024-05-01 valid 40", "2024-05-06 too-fast null", "2024-05-07 valid 52"]);
  });

  it("allows up to 24 h on the same or the next day and no more (DOMAIN.md: rises > 24 h/day are invalid)", () => {
    expect(
      statuses([
        { date: "2024-05-01", hours: 10 },
        { date: "2024-05-01", hours: 34 },
        { date: "2024-05-02", hours: 58.5 },
      ]),
    ).toEqual(["2024-05-01 valid 10", "2024-05-01 valid 34", "2024-05-02 too-fast null"]);
  });

  it("starts a new generation at a noted meter change, offset by the old meter's final value (DOMAIN.md: meter change → new generation with an offset)", () => {
    const cleaned = cleanHourMeter([
      { date: "2022-01-01", hours: 2900 },
      { date: "2022-06-01", hours: 40, meterChanged: true, oldMeterFinalHours: 3100 },
      { date: "2022-09-01", hours: 300 },
    ]);
    // Offset 3,100: the new meter started at 0 when the old one stood at 3,100.
    expect(cleaned.map((r) => [r.generation, r.offset, r.machineHours])).toEqual([
      [0, 0, 2900],
      [1, 3100, 3140],
      [1, 3100, 3400],
    ]);
  });

  it("continues machine hours from the last valid reading when the old meter's final value is unknown (DOMAIN.md meter change; arithmetic written out)", () => {
    const cleaned = cleanHourMeter([
      { date: "2022-01-01", hours: 2900 },
      { date: "2022-06-01", hours: 15, meterChanged: true },
    ]);
    expect(cleaned[1]).toMatchObject({ generation: 1, offset: 2885, machineHours: 2900, valid: true });
  });

  it("invalidates a reading dated after the as-of date, such as 2052 for 2025 (DOMAIN.md bad rows: future dates)", () => {
    expect(statuses([{ date: "2025-02-01", hours: 10 }, { date: "2052-02-03", hours: 12 }], "2025-12-31")).toEqual([
      "2025-02-01 valid 10",
      "2052-02-03 future-date null",
    ]);
  });

  it("marks negative readings unreadable (DOMAIN.md bad rows)", () => {
    expect(cleanHourMeter([{ date: "2025-02-01", hours: -5 }])[0].status).toBe("unreadable");
  });
});

describe("hoursAtDate(trail, date)", () => {
  const trail = cleanHourMeter([
    { date: "2024-01-01", hours: 1000 },
    { date: "2024-01-11", hours: 1050 },
    { date: "2024-01-21", hours: 1090 },
  ]);

  it("returns a reading on its own date and interpolates linearly between readings (DOMAIN.md; arithmetic written out)", () => {
    expect(hoursAtDate(trail, "2024-01-11")).toEqual({ hours: 1050, method: "reading" });
    // 4 of 10 days from 1,000 to 1,050 h: 1,020 h.
    expect(hoursAtDate(trail, "2024-01-05")).toEqual({ hours: 1020, method: "interpolated" });
  });

  it("extrapolates at the trail's average rate for at most 90 days, flagged (DOMAIN.md; arithmetic written out)", () => {
    // 90 h over 20 days = 4.5 h/day; 2024-04-20 is 90 days after 2024-01-21: 1,090 + 405 = 1,495 h.
    expect(hoursAtDate(trail, "2024-04-20")).toEqual({ hours: 1495, method: "extrapolated" });
    expect(hoursAtDate(trail, "2024-04-21")).toBeNull();
  });

  it("gives nothing before the first valid reading (common practice, no source)", () => {
    expect(hoursAtDate(trail, "2023-12-31")).toBeNull();
  });

  it("skips invalid readings (DOMAIN.md: interpolate between valid readings)", () => {
    const withBad = cleanHourMeter([
      { date: "2024-01-01", hours: 1000 },
      { date: "2024-01-06", hours: 9000 },
      { date: "2024-01-11", hours: 1050 },
    ]);
    expect(hoursAtDate(withBad, "2024-01-06")).toEqual({ hours: 1025, method: "interpolated" });
    expect(lastValidHours(withBad)).toBe(1050);
  });
});

describe("dayNumber(isoDate)", () => {
  it("counts calendar days across a leap day (common practice, no source)", () => {
    expect(dayNumber("2024-03-01") - dayNumber("2024-02-28")).toBe(2);
    expect(dayNumber("2024-03-01T23:59:00Z")).toBe(dayNumber("2024-03-01"));
  });
});
