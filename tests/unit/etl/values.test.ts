import { describe, expect, it } from "vitest";
import { parseFaultCodes } from "../../../etl/transform/jobs.js";
import { resolveModel } from "../../../etl/transform/machines.js";
import { normaliseIdentifier, parseDate, parseDecimal, parseHours } from "../../../etl/transform/values.js";

describe("parseDate", () => {
  it("resolves the same text by the profile's format, never by guessing", () => {
    expect(parseDate("03/04/2024", "mdy")).toBe("2024-03-04");
    expect(parseDate("03/04/2024", "dmy")).toBe("2024-04-03");
    expect(parseDate("03.04.2024", "dmy")).toBe("2024-04-03");
  });
  it("accepts ISO dates with a trailing time", () => expect(parseDate("2024-01-03T08:15:00", "iso")).toBe("2024-01-03"));
  it("rejects impossible dates and a format the profile does not use", () => {
    expect(parseDate("31.02.2024", "dmy")).toBeNull();
    expect(parseDate("2023-02-29", "iso")).toBeNull();
    expect(parseDate("2024-01-03", "mdy")).toBeNull();
  });
  it("accepts 29 February in a leap year", () => expect(parseDate("29/02/2024", "dmy")).toBe("2024-02-29"));
});

describe("parseDecimal and parseHours", () => {
  it("reads a decimal comma only when the profile says so", () => {
    expect(parseDecimal("1234,5", true)).toBe(1234.5);
    expect(parseDecimal("1.234,5", true)).toBe(1234.5);
    expect(parseDecimal("1234,5", false)).toBeNull();
  });
  it("reads hours as h:mm", () => expect(parseHours("1234:30", "h:mm", false)).toBe(1234.5));
  it("reads decimal-comma hours", () => expect(parseHours("812,25", "decimal", true)).toBe(812.25));
  it("rejects text that is not a number", () => expect(parseHours("12x4", "decimal", false)).toBeNull());
});

describe("normaliseIdentifier", () => {
  it("trims, upper-cases and strips dashes and spaces", () => expect(normaliseIdentifier(" kd-lv 0012 ")).toBe("KDLV0012"));
});

describe("resolveModel", () => {
  it("maps variant spellings onto the catalog's model line", () => {
    expect(resolveModel({}, "skl ")?.code).toBe("SKL");
    expect(resolveModel({}, "T-RN")?.code).toBe("TRN");
    expect(resolveModel({ SKIDDY: "SKL" }, "skiddy")?.code).toBe("SKL");
  });
  it("returns null for a model that is truly unknown", () => expect(resolveModel({}, "SKLQ")).toBeNull());
});

describe("parseFaultCodes", () => {
  it("reads SPN-FMI pairs in the forms shops write them", () => {
    expect(parseFaultCodes("520210-5")).toEqual([[520210, 5, 1]]);
    expect(parseFaultCodes("SPN 520210 FMI 5; 520211/5 x2")).toEqual([[520210, 5, 1], [520211, 5, 2]]);
  });
  it("refuses an FMI above 31 and text that is no code", () => {
    expect(parseFaultCodes("520210-45")).toBeNull();
    expect(parseFaultCodes("engine light")).toBeNull();
  });
});
