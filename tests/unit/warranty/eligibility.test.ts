import { describe, expect, it } from "vitest";
import { coverageClassFor, eligibility, termsFor, DEFAULT_TERMS } from "../../../server/services/warranty/eligibility.js";
import { addMonths } from "../../../shared/dates.js";

// Terms from the demo world (common practice, no source): engine 36 months / 3,000 h, base 24 months / 2,000 h.
const engine = { months: 36, hours: 3000 };
const base = { months: 24, hours: 2000 };

describe("addMonths(date, n)", () => {
  it("adds calendar months and falls back to the last day of a shorter month", () => {
    expect(addMonths("2021-03-15", 36)).toBe("2024-03-15");
    expect(addMonths("2022-01-31", 1)).toBe("2022-02-28");
    expect(addMonths("2023-01-31", 13)).toBe("2024-02-29");
  });
});

describe("eligibility(...) at the months limit", () => {
  // delivered 2021-03-15; 2021-03-15 + 36 months = 2024-03-15, the last covered day
  const at = (failureDate: string) => eligibility({ coverageClass: "engine", terms: engine, deliveryDate: "2021-03-15", failureDate, hoursAtFailure: 1200 });

  it("covers a failure one day before the cover ends (2024-03-14)", () => {
    const e = at("2024-03-14");
    expect(e.verdict).toBe("covered");
    expect(e.coverEnds).toBe("2024-03-15");
    expect(e.monthsCheck.text).toContain("2021-03-15 + 36 months = cover to 2024-03-15");
    expect(e.monthsCheck.text).toContain("1 day before");
  });

  it("covers a failure on the last covered day (2024-03-15)", () => {
    expect(at("2024-03-15").verdict).toBe("covered");
  });

  it("refuses a failure one day after the cover ends (2024-03-16) and says the months limit ended it", () => {
    const e = at("2024-03-16");
    expect(e.verdict).toBe("not_covered");
    expect(e.endedBy).toBe("months");
    expect(e.monthsCheck.text).toContain("1 day after that: outside");
    expect(e.summary).toMatch(/months limit was passed/);
  });
});

describe("eligibility(...) at the hours limit", () => {
  // the failure is well inside the months (delivered 2023-01-10, fails 2024-01-10 of 24 months)
  const at = (hours: number) => eligibility({ coverageClass: "base", terms: base, deliveryDate: "2023-01-10", failureDate: "2024-01-10", hoursAtFailure: hours });

  it("covers a failure one hour before the limit (1,999 h of 2,000 h: 2,000 − 1,999 = 1 h to spare)", () => {
    const e = at(1999);
    expect(e.verdict).toBe("covered");
    expect(e.hoursCheck.text).toContain("limit 2,000 h − 1,999 h = 1 h to spare: inside");
  });

  it("covers a failure exactly at the limit (2,000 h)", () => {
    expect(at(2000).verdict).toBe("covered");
  });

  it("refuses a failure one hour after the limit (2,001 h − 2,000 h = 1 h over) and says the hours limit ended it", () => {
    const e = at(2001);
    expect(e.verdict).toBe("not_covered");
    expect(e.endedBy).toBe("hours");
    expect(e.hoursCheck.text).toContain("2,001 h − limit 2,000 h = 1 h over: outside");
  });
});

describe("eligibility(...) whichever comes first", () => {
  it("refuses a young machine that ran past the hours (8 months old, 3,100 h of 3,000 h)", () => {
    const e = eligibility({ coverageClass: "engine", terms: engine, deliveryDate: "2024-01-01", failureDate: "2024-09-01", hoursAtFailure: 3100 });
    expect(e.monthsCheck.inside).toBe(true);
    expect(e.verdict).toBe("not_covered");
    expect(e.endedBy).toBe("hours");
  });

  it("refuses a low-hour machine past the months (37 months old, 900 h of 3,000 h)", () => {
    const e = eligibility({ coverageClass: "engine", terms: engine, deliveryDate: "2021-01-01", failureDate: "2024-02-01", hoursAtFailure: 900 });
    expect(e.hoursCheck.inside).toBe(true);
    expect(e.verdict).toBe("not_covered");
    expect(e.endedBy).toBe("months");
  });

  it("names both limits when both are passed", () => {
    const e = eligibility({ coverageClass: "base", terms: base, deliveryDate: "2020-01-01", failureDate: "2023-01-01", hoursAtFailure: 2500 });
    expect(e.endedBy).toBe("both");
  });

  it("gives no verdict without an hour reading and marks the claim at risk", () => {
    const e = eligibility({ coverageClass: "engine", terms: engine, deliveryDate: "2023-01-01", failureDate: "2023-06-01", hoursAtFailure: null });
    expect(e.verdict).toBe("unknown");
    expect(e.summary).toMatch(/hour meter is missing.*at risk/);
  });

  it("gives no verdict without a delivery date", () => {
    const e = eligibility({ coverageClass: "engine", terms: engine, deliveryDate: null, failureDate: "2023-06-01", hoursAtFailure: 100 });
    expect(e.verdict).toBe("unknown");
    expect(e.coverEnds).toBeNull();
  });

  it("uses the engine class for heater plugs and the base class for hydraulics", () => {
    expect(coverageClassFor({ system: "Engine" })).toBe("engine");
    expect(coverageClassFor({ system: "Hydraulics" })).toBe("base");
  });

  it("takes the machine registry's terms and falls back to the defaults when they are missing", () => {
    const m = { warrantyBaseMonths: 12, warrantyBaseHours: 1000, warrantyEngineMonths: null, warrantyEngineHours: null };
    expect(termsFor("base", m)).toEqual({ months: 12, hours: 1000, fromRegistry: true });
    expect(termsFor("engine", m)).toEqual({ ...DEFAULT_TERMS.engine, fromRegistry: false });
  });
});
