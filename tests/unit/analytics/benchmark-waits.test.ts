import { describe, expect, it } from "vitest";
import { histogram, waitDistribution, waitMonths, waitStretches, type WaitRow } from "../../../server/analytics/benchmark-waits.js";

// Wait bands and thresholds: DOMAIN.md §3 "Parts wait" (common practice, no source). Quantiles by Hyndman & Fan
// (1996), "Sample quantiles in statistical packages", definition 7 (R's default); the Wilson interval by
// Newcombe (1998), Statistics in Medicine 17:857–872, Table I, method 3.

const row = (days: number, lines: number, over: Partial<WaitRow> = {}): WaitRow => ({
  shop: "S1", orderMonth: "2024-01", closeMonth: "2024-01", days, backOrdered: false, component: "Battery", engineFamily: "K18-3G", lines, ...over,
});

describe("waitDistribution(key, label, histogram)", () => {
  it("shares every line out across the bands, the shares adding up to 1", () => {
    const d = waitDistribution("S1", "S1", histogram([row(0, 5), row(3, 2), row(4, 1), row(7, 1), row(8, 1), row(14, 1), row(15, 1), row(60, 2)]));
    expect(d.n).toBe(14);
    expect(d.bands.map((b) => b.lines)).toEqual([7, 2, 2, 3]);
    expect(d.bands.reduce((s, b) => s + b.share, 0)).toBeCloseTo(1, 15);
    expect(d.over.map((o) => [o.days, o.figure.successes])).toEqual([[3, 7], [7, 5], [14, 3]]);
  });

  it("gives Hyndman and Fan's definition 7 quantiles: 1, 2, 3, 4, 10 → median 3, p90 7.6", () => {
    // h = (n − 1)·p = 3.6 → x₄ + 0.6·(x₅ − x₄) = 4 + 0.6·6 = 7.6
    const d = waitDistribution("g", "g", histogram([row(1, 1), row(2, 1), row(3, 1), row(4, 1), row(10, 1)]));
    expect([d.median, d.p90]).toEqual([3, 7.6]);
  });

  it("gives Newcombe's interval 0.2553–0.3662 for 81 of 263 lines over 7 days", () => {
    const d = waitDistribution("g", "g", histogram([row(0, 182), row(9, 81)]));
    const over7 = d.over.find((o) => o.days === 7)!.figure;
    expect(over7.value).toBeCloseTo(81 / 263, 12);
    expect(over7.lower!).toBeCloseTo(0.2553, 4);
    expect(over7.upper!).toBeCloseTo(0.3662, 4);
  });

  it("says there is no part received when there are no lines (common practice, no source)", () => {
    const d = waitDistribution("g", "g", new Map());
    expect(d.n).toBe(0);
    expect(d.bands.every((b) => b.share === 0)).toBe(true);
    expect(d.over[0]!.figure).toMatchObject({ value: null, note: "no part received" });
  });
});

describe("waitMonths(rows, months) and waitStretches(months, rows, baseline)", () => {
  // eight ordinary months with 1 of 50 lines over 14 days, then two months with 20 of 50: the usual share is 2 %
  const months = ["2022-07", "2022-08", "2022-09", "2022-10", "2022-11", "2022-12", "2023-01", "2023-02", "2023-03", "2023-04"];
  const rows = months.flatMap((m) => {
    const long = m === "2022-12" || m === "2023-01";
    return [
      row(1, long ? 30 : 49, { orderMonth: m }),
      row(45, long ? 20 : 1, { orderMonth: m, backOrdered: true, component: long ? "Heater-plug set" : "Battery", engineFamily: long ? "K26-4R" : "K18-3G" }),
    ];
  });

  it("takes the median month as the usual share and marks only the months far above it", () => {
    const m = waitMonths(rows, months);
    expect(m.baseline).toBeCloseTo(0.02, 12);
    expect(m.months.filter((x) => x.standout).map((x) => x.month)).toEqual(["2022-12", "2023-01"]);
    expect(m.months.find((x) => x.month === "2022-12")!.over14).toBeCloseTo(0.4, 12);
  });

  it("joins consecutive standout months into one stretch and names the part that waited", () => {
    const m = waitMonths(rows, months);
    const s = waitStretches(m.months, rows, m.baseline);
    expect(s).toHaveLength(1);
    expect(s[0]).toMatchObject({ from: "2022-12", to: "2023-01", label: "December 2022 to January 2023", lines: 100, over14: 40, backOrdered: 40 });
    expect(s[0]!.parts[0]).toMatchObject({ component: "Heater-plug set", engineFamily: "K26-4R", over14: 40, median: 45 });
    expect(s[0]!.words).toMatch(/^Parts ordered December 2022 to January 2023: 40 % of 100 part lines waited over 14 days \(usual month 2 %\)/);
  });

  it("judges no month below 30 lines", () => {
    const few = [row(1, 10, { orderMonth: "2024-01" }), row(40, 10, { orderMonth: "2024-01" })];
    const m = waitMonths(few, ["2024-01"]);
    expect(m.baseline).toBeNull();
    expect(m.months[0]!.standout).toBe(false);
  });
});
