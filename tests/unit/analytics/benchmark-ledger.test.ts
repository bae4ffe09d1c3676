import { describe, expect, it } from "vitest";
import { buildLedger, indexClaims, sumCells, type MonthlyTotals } from "../../../server/analytics/benchmark-ledger.js";
import type { OriginalLine, RepairLineRecord } from "../../../server/analytics/comebacks.js";

// The ledger only adds counts: lines with ≥ 1 comeback ÷ qualifying lines, counted in the month the original
// closed once its window has passed (DOMAIN.md §3 "Shop KPIs", common practice, no source). Lines and sums are
// invented; the expected counts are added by hand.

const settings = { days: 30, hours: 100 };
let seq = 0;
const original = (shop: string, closed: string, technician: string | null, comebacks: number): OriginalLine => {
  const line: RepairLineRecord = {
    id: `L${++seq}`, shop, technician, machine: `M${seq}`, system: "Engine", lineType: "failure", customerDamage: false,
    opened: closed, closed, hourMeter: null,
  };
  const followUp = { ...line, id: `L${++seq}` };
  return { line, comebacks: Array.from({ length: comebacks }, () => ({ original: line, followUp, daysAfterClose: 5, hoursAfterClose: null })) };
};
const totals = (shop: string, month: string, effLines: number, standardHours: number, actualHours: number): MonthlyTotals => ({
  shop, month, effLines, standardHours, actualHours, partLines: 2, backOrdered: 1, coldStartJobs: 0, coldStartMeasured: 0,
});

describe("buildLedger(originals, totals, waits, asOf, settings)", () => {
  const originals = [
    original("A", "2024-01-05", "A-T1", 1),
    original("A", "2024-01-20", "A-T1", 0),
    original("A", "2024-01-25", "A-T2", 2),
    original("A", "2024-02-10", null, 0),
    // closed 2024-02-20: its 30-day window ends 2024-03-21, after asOf, so it is not counted yet
    original("A", "2024-02-20", "A-T1", 1),
    original("B", "2024-01-07", "B-T1", 0),
  ];
  const ledger = buildLedger(originals, [totals("A", "2024-01", 3, 6, 5), totals("A", "2024-01", 1, 2, 3)], [{ shop: "A", month: "2024-01", days: 4, lines: 2 }, { shop: "A", month: "2024-01", days: 4, lines: 1 }], "2024-03-15", settings);

  it("counts each original whose window has passed, in its month of close, per technician too", () => {
    const jan = ledger.get("A")!.get("2024-01")!;
    expect(jan).toMatchObject({ lines: 3, withComeback: 2 });
    expect([...jan.techs]).toEqual([["A-T1", { lines: 2, withComeback: 1 }], ["A-T2", { lines: 1, withComeback: 1 }]]);
    expect(ledger.get("A")!.get("2024-02")).toMatchObject({ lines: 1, withComeback: 0 });
    expect(ledger.get("A")!.get("2024-02")!.techs.size).toBe(0);
  });

  it("adds the SQL sums and the parts-wait histogram into the same cells", () => {
    const jan = ledger.get("A")!.get("2024-01")!;
    expect(jan).toMatchObject({ effLines: 4, standardHours: 8, actualHours: 8, partLines: 4, backOrdered: 2 });
    expect([...jan.waits]).toEqual([[4, 3]]);
  });
});

describe("sumCells(ledger, shops, months, claims)", () => {
  const ledger = buildLedger([original("A", "2024-01-05", "A-T1", 1), original("B", "2024-01-06", "A-T1", 0), original("B", "2024-02-06", "B-T1", 1)], [], [], "2024-06-30", settings);
  const claims = indexClaims(
    [
      { shop: "A", month: "2024-01", claims: 3, onTime: 2 },
      { shop: "B", month: "2024-02", claims: 1, onTime: 1 },
      // a month that begins after the counted-through date is left out
      { shop: "B", month: "2024-06", claims: 5, onTime: 5 },
    ],
    "2024-05-31",
  );

  it("adds shops and months, technicians and claims", () => {
    const s = sumCells(ledger, ["A", "B"], ["2024-01", "2024-02"], claims);
    expect(s).toMatchObject({ lines: 3, withComeback: 2, claims: 4, claimsOnTime: 3 });
    expect(s.techs.get("A-T1")).toEqual({ lines: 2, withComeback: 1 });
    expect(sumCells(ledger, ["A", "B"], ["2024-06"], claims)).toMatchObject({ lines: 0, claims: 0 });
  });

  it("is empty for a shop or month with nothing in it", () => {
    expect(sumCells(ledger, ["C"], ["2024-01"], claims)).toMatchObject({ lines: 0, withComeback: 0, claims: 0, effLines: 0 });
  });
});
