import { describe, expect, it } from "vitest";
import { incompleteMonthsWords, lastCompleteMonth, monthCompleteness } from "../../../server/analytics/month-completeness.js";
import { expectedByMonth } from "../../../server/analytics/expected-by-month.js";

// Arithmetic worked by hand in the comments; the threshold (95 %) is Ironledger's own choice.
describe("monthCompleteness(rows)", () => {
  const rows = [
    { shopCode: "A", month: "2024-05", exposureDays: 300, serviceDays: 300, readingsThrough: "2024-07-20" },
    { shopCode: "B", month: "2024-05", exposureDays: 290, serviceDays: 310, readingsThrough: "2024-07-31" },
    { shopCode: "A", month: "2024-06", exposureDays: 250, serviceDays: 300, readingsThrough: "2024-07-20" },
    { shopCode: "B", month: "2024-06", exposureDays: 300, serviceDays: 300, readingsThrough: "2024-07-31" },
    { shopCode: "A", month: "2024-07", exposureDays: 100, serviceDays: 310, readingsThrough: "2024-07-20" },
    { shopCode: "B", month: "2024-07", exposureDays: 200, serviceDays: 310, readingsThrough: "2024-07-31" },
  ];

  it("sums the shops: May 590 / 610 = 96.7 % complete, June 550 / 600 = 91.7 % and July 300 / 620 incomplete", () => {
    const m = monthCompleteness(rows);
    expect(m.map((x) => x.month)).toEqual(["2024-05", "2024-06", "2024-07"]);
    expect(m[0].coverage).toBeCloseTo(590 / 610, 12);
    expect(m.map((x) => x.complete)).toEqual([true, false, false]);
    // shop B alone is short in May (290 / 310 = 93.5 %) although the group is not
    expect(m[0].shortShops).toEqual([{ shopCode: "B", coverage: 290 / 310 }]);
    expect(lastCompleteMonth(m)).toBe("2024-05");
    expect(incompleteMonthsWords(m)).toBe(
      "Left out as incomplete (hour readings cover less than 95 % of the month's machine-days in service): 2024-06 (91 %), 2024-07 (48 %).",
    );
  });

  it("has no coverage for a month without machines in service, and never reads over 100 %", () => {
    const m = monthCompleteness([
      { shopCode: "A", month: "2024-01", exposureDays: 0, serviceDays: 0, readingsThrough: null },
      { shopCode: "A", month: "2024-02", exposureDays: 31, serviceDays: 29, readingsThrough: null },
    ]);
    expect(m[0]).toMatchObject({ coverage: null, complete: false });
    expect(m[1]).toMatchObject({ coverage: 1, complete: true });
    expect(incompleteMonthsWords(m.slice(1))).toBeNull();
  });
});

describe("expectedByMonth(cells, isReference)", () => {
  it("applies the reference cells' rates to each month's hours, scaled so the reference reads exactly 1", () => {
    // reference (Jan, Feb): cell young/cold 4 failures over 2,000 h = 2 per 1,000 h; old/cold 12 over 3,000 h = 4 per 1,000 h
    // March has 1,000 young and 2,000 old hours: E = 1,000 × 0.002 + 2,000 × 0.004 = 10
    const cells = [
      { month: "2024-01", hourBand: "young", tempBand: "cold", failures: 2, engineHours: 1000 },
      { month: "2024-01", hourBand: "old", tempBand: "cold", failures: 4, engineHours: 1000 },
      { month: "2024-02", hourBand: "young", tempBand: "cold", failures: 2, engineHours: 1000 },
      { month: "2024-02", hourBand: "old", tempBand: "cold", failures: 8, engineHours: 2000 },
      { month: "2024-03", hourBand: "young", tempBand: "cold", failures: 3, engineHours: 1000 },
      { month: "2024-03", hourBand: "old", tempBand: "cold", failures: 20, engineHours: 2000 },
    ];
    const e = expectedByMonth(cells, (m) => m < "2024-03");
    expect(e.map((x) => x.month)).toEqual(["2024-01", "2024-02", "2024-03"]);
    expect(e[0].expected).toBeCloseTo(1000 * 0.002 + 1000 * 0.004, 12); // 6
    expect(e[1].expected).toBeCloseTo(1000 * 0.002 + 2000 * 0.004, 12); // 10
    expect(e[2].expected).toBeCloseTo(10, 12);
    expect(e[2].failures).toBe(23);
  });

  it("gives a cell the reference never saw the reference's overall rate, and rescales for failures no cell's hours carry", () => {
    // reference: 6 failures in cells with 3,000 h, plus 3 failures without an hour band (no hours): Σ O = 9
    // raw E: Jan 3,000 h × (9 / 3,000) → cell rate 6 / 3,000 = 0.002 → 6; scaled by 9 / 6 = 1.5 → 9
    const cells = [
      { month: "2024-01", hourBand: "young", tempBand: "cold", failures: 6, engineHours: 3000 },
      { month: "2024-01", hourBand: "unknown", tempBand: "cold", failures: 3, engineHours: 0 },
      { month: "2024-02", hourBand: "new-band", tempBand: "cold", failures: 1, engineHours: 1000 },
    ];
    const e = expectedByMonth(cells, (m) => m === "2024-01");
    expect(e[0].expected).toBeCloseTo(9, 12);
    // February's 1,000 h in an unseen cell: overall reference rate 9 / 3,000 = 0.003 → 3, scaled 1.5 → 4.5
    expect(e[1].expected).toBeCloseTo(4.5, 12);
  });
});
