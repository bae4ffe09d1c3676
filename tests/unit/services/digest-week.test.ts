import { describe, expect, it } from "vitest";
import { digestWeek, plusDays } from "../../../server/services/digest/week.js";

// ISO 8601 week dates. The first three are the examples of the Wikipedia article "ISO week date" (from memory);
// every row was checked against Python's datetime.date.fromisoformat(d).isocalendar().
describe("digestWeek(date)", () => {
  it.each([
    ["2008-12-29", "2009-W01", 1],
    ["2010-01-03", "2009-W53", 7],
    ["2005-01-01", "2004-W53", 6],
    ["2021-01-03", "2020-W53", 7],
    ["2025-07-07", "2025-W28", 1],
    ["2026-12-31", "2026-W53", 4],
  ])("puts %s in ISO week %s, ISO weekday %i", (date, key, isoDay) => {
    expect(digestWeek(date)).toMatchObject({ key, isoDay });
  });

  it("gives the Monday and Sunday around the day, and the week in words", () => {
    expect(digestWeek("2025-07-09")).toEqual({ key: "2025-W28", monday: "2025-07-07", sunday: "2025-07-13", label: "week 28, 7–13 July 2025", isoDay: 3 });
    // a week across two months and one across two years (Python isocalendar: 2008-12-29 is 2009-W01-1)
    expect(digestWeek("2025-07-30").label).toBe("week 31, 28 July – 3 August 2025");
    expect(digestWeek("2009-01-01").label).toBe("week 1, 29 December 2008 – 4 January 2009");
  });

  it("refuses what is not an ISO date", () => {
    expect(() => digestWeek("07/07/2025")).toThrow(/not an ISO date/);
    expect(() => digestWeek("2025-02-30")).toThrow(/not an ISO date/);
  });
});

describe("plusDays(date, days)", () => {
  it("counts calendar days across a month and a leap day (2024 is a leap year: Gregorian rule)", () => {
    expect(plusDays("2025-07-07", -7)).toBe("2025-06-30");
    expect(plusDays("2024-02-28", 1)).toBe("2024-02-29");
  });
});
