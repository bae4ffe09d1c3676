import { describe, expect, it } from "vitest";
import { tableCsv, toCsv } from "@/lib/csv";

// The chart cards' CSV download: RFC 4180 quoting (§2.6–2.7), CRLF records (§2.1), the shared formula rule
// (OWASP, "CSV Injection"; tested in tests/unit/shared/csv-cell.test.ts) and numbers rounded to six decimals
// (common practice, no source).
describe("toCsv", () => {
  const columns = [
    { key: "label", label: "Band, °C" },
    { key: "rate", label: "Rate" },
  ];

  it("writes a header and one CRLF-ended record per row, quoting commas, quotes and line breaks", () => {
    expect(toCsv(columns, [{ label: 'say "cold"\nday', rate: 2 }])).toBe(`"Band, °C",Rate\r\n"say ""cold""\nday",2\r\n`);
  });

  it("rounds numbers to six decimals and leaves empty values empty", () => {
    expect(toCsv(columns, [{ label: null, rate: 1 / 3 }, { rate: 0.1 + 0.2 }])).toBe(`"Band, °C",Rate\r\n,0.333333\r\n,0.3\r\n`);
  });

  it("neutralises a cell a spreadsheet would run as a formula, but keeps negative numbers as numbers", () => {
    expect(toCsv(columns, [{ label: "=SUM(A1:A2)", rate: -12.5 }, { label: "@x", rate: "-3" }])).toBe(`"Band, °C",Rate\r\n'=SUM(A1:A2),-12.5\r\n'@x,-3\r\n`);
  });
});

// The product's rule for downloaded tables: raw numbers, the unit in the header, proportions as fractions
// (0–1) headed "(fraction)". 12.5 % = 0.125 (definition of per cent, "per hundred").
describe("tableCsv", () => {
  it("writes a percentage column as a fraction under a '(fraction)' header and leaves other columns as they are", () => {
    const columns = [
      { key: "shop", label: "Shop" },
      { key: "share", label: "Share %", percent: true },
      { key: "over7", label: "Over 7 days (%)", percent: true },
      { key: "survival", label: "Survival", csvLabel: "Survival (fraction)" },
    ];
    expect(tableCsv(columns, [{ shop: "S1", share: 12.5, over7: 3, survival: 0.9 }, { shop: "S2", share: null, over7: 100, survival: 1 }])).toBe(
      "Shop,Share (fraction),Over 7 days (fraction),Survival (fraction)\r\nS1,0.125,0.03,0.9\r\nS2,,1,1\r\n",
    );
  });
});
