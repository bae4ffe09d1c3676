import { describe, expect, it } from "vitest";
import { monthsEnding, resolvePeriod } from "../../../server/analytics/benchmark-periods.js";

// Calendar facts (Gregorian calendar, ISO 8601 months): 2024 is a leap year, so February 2024 ends on the 29th;
// June 30 − 30 days = May 31; quarters are Jan–Mar, Apr–Jun, Jul–Sep, Oct–Dec (common practice, no source).
// The counting rule, only lines whose comeback window has fully elapsed, is DOMAIN.md §3 "Shop KPIs" (common
// practice, no source).

describe("monthsEnding(last, count)", () => {
  it("lists the months ending with the last one, oldest first, across a year end", () => {
    expect(monthsEnding("2024-02", 3)).toEqual(["2023-12", "2024-01", "2024-02"]);
    expect(monthsEnding("2024-02", 1)).toEqual(["2024-02"]);
  });
});

describe("resolvePeriod(kind, at, asOf, firstMonth, days)", () => {
  it("defaults to the 12 months to the last month whose window has passed", () => {
    // data to 2025-06-30, 30-day window: lines closed after 2025-05-31 still wait; May is complete
    const r = resolvePeriod("rolling12", undefined, "2025-06-30", "2021-01", 30);
    expect(r.period).toEqual({
      kind: "rolling12", key: "12m-2025-05", label: "12 months to May 2025", from: "2024-06-01", to: "2025-05-31",
      asOf: "2025-06-30", countedThrough: "2025-05-31", complete: true, firstMonth: "2021-01", lastMonth: "2025-05",
    });
    expect(r.months).toHaveLength(12);
    expect(r.months[0]).toBe("2024-06");
  });

  it("leaves out a month whose last days are still inside the window", () => {
    // 2025-07-15 − 30 days = 2025-06-15: June is not over, so the last month counted is May
    expect(resolvePeriod("month", undefined, "2025-07-15", "2021-01", 30).period).toMatchObject({ key: "2025-05", countedThrough: "2025-06-15", lastMonth: "2025-05" });
  });

  it("defaults a quarter and a year to the last complete one", () => {
    const q = resolvePeriod("quarter", undefined, "2025-06-30", "2021-01", 30);
    expect(q.months).toEqual(["2025-01", "2025-02", "2025-03"]);
    expect(q.period).toMatchObject({ key: "2025-Q1", label: "Q1 2025", from: "2025-01-01", to: "2025-03-31" });
    const y = resolvePeriod("year", undefined, "2025-06-30", "2021-01", 30);
    expect(y.period).toMatchObject({ key: "2024", label: "2024", from: "2024-01-01", to: "2024-12-31" });
    // 2025-01-30 − 30 days = 2024-12-31: December is complete, so 2024 is the year
    expect(resolvePeriod("year", undefined, "2025-01-30", "2021-01", 30).period.key).toBe("2024");
  });

  it("takes the period holding the month asked for, ending on the calendar's last day", () => {
    const m = resolvePeriod("month", "2024-02", "2025-06-30", "2021-01", 30);
    expect(m.period).toMatchObject({ key: "2024-02", label: "February 2024", from: "2024-02-01", to: "2024-02-29", complete: true });
    expect(resolvePeriod("quarter", "2023-11", "2025-06-30", "2021-01", 30).period).toMatchObject({ key: "2023-Q4", from: "2023-10-01", to: "2023-12-31" });
  });

  it("is incomplete while its last month is still counted", () => {
    expect(resolvePeriod("month", "2025-06", "2025-06-30", "2021-01", 30).period.complete).toBe(false);
  });

  it("runs every month from the first with data, and at least one month", () => {
    const all = resolvePeriod("all", "2021-05", "2025-06-30", "2021-03", 30);
    expect(all.months).toEqual(["2021-03", "2021-04", "2021-05"]);
    expect(all.period).toMatchObject({ key: "all-2021-05", label: "March 2021 to May 2021" });
    expect(resolvePeriod("all", "2021-01", "2025-06-30", "2021-03", 30).months).toEqual(["2021-01"]);
  });

  it("moves the counted-through date with the window", () => {
    // 2025-06-30 − 60 days = 2025-05-01 (30 days of June, 30 of May): April is the last complete month
    expect(resolvePeriod("month", undefined, "2025-06-30", "2021-01", 60).period).toMatchObject({ countedThrough: "2025-05-01", lastMonth: "2025-04" });
  });
});
