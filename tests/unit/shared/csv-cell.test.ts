import { describe, expect, it } from "vitest";
import { stringify } from "csv-stringify/sync";
import { csvCell, neutraliseCell } from "../../../shared/csv-cell.js";

// OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): no cell may begin with
// = + - @, tab (0x09) or carriage return (0x0D); prepend a single quote, and quote the cell (RFC 4180).
describe("neutraliseCell (OWASP CSV injection guidance)", () => {
  it.each([
    ["=1+2", "'=1+2"],
    ["=HYPERLINK(\"http://x.invalid\",\"y\")", "'=HYPERLINK(\"http://x.invalid\",\"y\")"],
    ["+1+2", "'+1+2"],
    ["-2+3+cmd|' /C calc'!A0", "'-2+3+cmd|' /C calc'!A0"],
    ["@SUM(1+9)", "'@SUM(1+9)"],
    ["\t=1", "'\t=1"],
    ["\r=1", "'\r=1"],
  ])("prefixes %j", (input, expected) => {
    expect(neutraliseCell(input)).toBe(expected);
  });

  it("leaves ordinary text and plain numbers as they are", () => {
    expect(neutraliseCell("plug open circuit")).toBe("plug open circuit");
    expect(neutraliseCell("-12.5")).toBe("-12.5");
    expect(neutraliseCell("-7")).toBe("-7");
    expect(neutraliseCell("a=b")).toBe("a=b");
  });

  it("quotes a neutralised cell that holds a comma or quote once csv-stringify writes it (RFC 4180 §2.6–2.7)", () => {
    const text = stringify([[csvCell('=A1,"x"'), csvCell(3.5), csvCell(null)]]);
    expect(text).toBe(`"'=A1,""x""",3.5,\n`);
  });
});
