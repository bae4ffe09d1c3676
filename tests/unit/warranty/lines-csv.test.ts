import { describe, expect, it } from "vitest";
import { parse } from "csv-parse/sync";
import { csvCell as neutralise } from "../../../shared/csv-cell.js";

describe("neutralise(cell)", () => {
  it("prefixes an apostrophe to text that a spreadsheet would run as a formula", () => {
    for (const s of ["=SUM(A1:A9)", "+1+1", "-2+3", "@cmd", "\tx", "\rx"]) expect(neutralise(s)).toBe(`'${s}`);
  });

  it("leaves plain text and numbers alone, negative numbers included", () => {
    expect(neutralise("Hard start below freezing")).toBe("Hard start below freezing");
    expect(neutralise(-12.5)).toBe("-12.5");
    expect(neutralise(null)).toBe("");
  });

  it("survives a CSV round trip with quotes and commas intact", async () => {
    const { stringify } = await import("csv-stringify/sync");
    const text = stringify([[neutralise('=HYPERLINK("x","y")'), neutralise("a, b")]]);
    expect(parse(text)).toEqual([[`'=HYPERLINK("x","y")`, "a, b"]]);
  });
});
