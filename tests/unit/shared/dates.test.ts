import { describe, expect, it } from "vitest";
import { addDays, addMonths, addMonthsToMonth, daysBetween, monthEnd, monthLabel, monthsBetween } from "../../../shared/dates.js";

// Gregorian calendar facts (ISO 8601 dates): 2024 is a leap year, 2023 and 1900 are not, 2000 is.
// POSIX time: 2000-01-01T00:00:00Z is 946,684,800 s after the epoch = 10,957 days (946684800 / 86400).
describe("calendar arithmetic", () => {
  it("counts days across leap years", () => {
    expect(daysBetween("1970-01-01", "2000-01-01")).toBe(10_957);
    expect(daysBetween("2024-02-28", "2024-03-01")).toBe(2);
    expect(daysBetween("2023-02-28", "2023-03-01")).toBe(1);
    expect(daysBetween("2024-03-01", "2024-02-28")).toBe(-2);
  });

  it("adds days, across a daylight-saving change in any zone", () => {
    expect(addDays("2024-02-28", 1)).toBe("2024-02-29");
    expect(addDays("2024-03-30", 2)).toBe("2024-04-01");
    expect(addDays("2025-01-01", -1)).toBe("2024-12-31");
  });

  it("adds months and clamps to the month's last day", () => {
    expect(addMonths("2024-01-31", 1)).toBe("2024-02-29");
    expect(addMonths("2023-01-31", 1)).toBe("2023-02-28");
    expect(addMonths("2024-05-15", -17)).toBe("2022-12-15");
  });

  it("works on months", () => {
    expect(addMonthsToMonth("2024-11", 3)).toBe("2025-02");
    expect(addMonthsToMonth("2024-01", -1)).toBe("2023-12");
    expect(monthEnd("2000-02")).toBe("2000-02-29");
    expect(monthEnd("1900-02")).toBe("1900-02-28");
    expect(monthsBetween("2023-11", "2025-02")).toBe(15);
  });

  it("names months in English (ISO 8601: month 01 is January, 12 is December)", () => {
    expect(monthLabel("2024-01")).toBe("January 2024");
    expect(monthLabel("2000-02")).toBe("February 2000");
    expect(monthLabel("1999-12")).toBe("December 1999");
  });

  it("refuses what is not an ISO date", () => {
    expect(() => addDays("02/03/2024", 1)).toThrow(/not an ISO date/);
  });
});
