import { describe, expect, it } from "vitest";
import { trendPoints } from "../../../server/analytics/benchmark-trend.js";
import { buildLedger } from "../../../server/analytics/benchmark-ledger.js";
import type { OriginalLine, RepairLineRecord } from "../../../server/analytics/comebacks.js";

// The rolling rate is the 12 months of closed lines ending with each month (common practice, no source); its
// interval is Wilson's, checked against Newcombe (1998) Table I: 15/148 → 0.0624–0.1605. Lines are invented.

let seq = 0;
const originals = (closed: string, lines: number, withComeback: number): OriginalLine[] =>
  Array.from({ length: lines }, (_, i) => {
    const line: RepairLineRecord = {
      id: `L${++seq}`, shop: "A", technician: null, machine: `M${seq}`, system: "Engine", lineType: "failure", customerDamage: false,
      opened: closed, closed, hourMeter: null,
    };
    return { line, comebacks: i < withComeback ? [{ original: line, followUp: { ...line, id: `F${seq}` }, daysAfterClose: 3, hoursAfterClose: null }] : [] };
  });

describe("trendPoints(ledger, claims, codes, last, count, peer)", () => {
  // 100 lines with 10 comebacks in 2023-01, 48 lines with 5 in 2023-12
  const ledger = buildLedger([...originals("2023-01-15", 100, 10), ...originals("2023-12-15", 48, 5)], [], [], "2024-06-30", { days: 30, hours: 100 });
  const points = trendPoints(ledger, new Map(), ["A"], "2024-01", 3, false);

  it("gives each month the 12 months ending with it", () => {
    expect(points.map((p) => p.month)).toEqual(["2023-11", "2023-12", "2024-01"]);
    // December 2023's window (2023-01 … 2023-12) holds both months: 15 of 148 lines
    expect(points[1]!.rolling).toMatchObject({ successes: 15, n: 148 });
    expect(points[1]!.rolling.lower!).toBeCloseTo(0.0624, 4);
    expect(points[1]!.rolling.upper!).toBeCloseTo(0.1605, 4);
    // January 2024's window (2023-02 … 2024-01) has lost January 2023
    expect(points[2]!.rolling).toMatchObject({ successes: 5, n: 48 });
  });

  it("gives the month's own rate from 30 lines on", () => {
    expect(points.map((p) => [p.monthLines, p.monthRate])).toEqual([[0, null], [48, 5 / 48], [0, null]]);
  });

  it("gives a peer its rounded rolling rate only", () => {
    const peer = trendPoints(ledger, new Map(), ["A"], "2024-01", 3, true)[1]!;
    // 15/148 = 0.101351 → 0.101
    expect(peer).toMatchObject({ monthRate: null, monthLines: null, rolling: { value: 0.101, n: null, lower: null } });
  });
});
