import { describe, expect, it } from "vitest";
import { cycleFigure, fixFunnel, fixRow, roCycles, unionDays } from "../../../server/analytics/benchmark-fix.js";
import { funnelLimits, wilsonInterval } from "../../../server/analytics/proportion.js";

// First-time fix and cycle time: DOMAIN.md §3 "Shop KPIs" (common practice, no source); the examples are worked
// by hand. The interval is Wilson's (Newcombe 1998, Statistics in Medicine 17:857–872, Table I: 81/263 →
// 0.2553–0.3662); funnel limits are the exact binomial ones of Spiegelhalter (2005), checked in proportion.test.ts.
// Quantiles: Hyndman & Fan (1996) definition 7.

describe("fixFunnel(complaints)", () => {
  it("narrows complaints to those without a return for parts, then to those that also did not come back", () => {
    const f = fixFunnel([
      { returnedForParts: false, cameBack: false },
      { returnedForParts: false, cameBack: true },
      { returnedForParts: true, cameBack: false },
      { returnedForParts: true, cameBack: true },
      { returnedForParts: false, cameBack: false },
    ]);
    expect(f).toEqual({ complaints: 5, noReturn: 3, fixed: 2 });
  });
});

describe("fixRow(key, label, funnel, p0, cycle)", () => {
  it("rates 182 of 263 complaints fixed first time with the complement of Newcombe's interval", () => {
    // 81/263 not fixed ↔ 182/263 fixed: Wilson limits 1 − 0.3662 and 1 − 0.2553
    const r = fixRow("S1", "S1", { complaints: 263, noReturn: 200, fixed: 182 }, 0.69, cycleFigure([]));
    expect(r.firstTimeFix.lower!).toBeCloseTo(1 - 0.3662, 4);
    expect(r.firstTimeFix.upper!).toBeCloseTo(1 - 0.2553, 4);
    expect(r.firstTimeFix.value).toBe(wilsonInterval(182, 263)!.proportion);
  });

  it("reads a rate under the lower funnel limit as worth watching, and does not rate fewer than 30 complaints", () => {
    const l = funnelLimits(0.85, 200);
    const x = Math.floor(l.exact998.lower * 200) - 1;
    const r = fixRow("S5", "S5", { complaints: 200, noReturn: 190, fixed: x }, 0.85, cycleFigure([]));
    expect(r.status).toBe("below_998");
    expect(r.words).toMatch(/fewer fixed first time than chance explains/);
    expect(fixRow("T", "T", { complaints: 29, noReturn: 29, fixed: 10 }, 0.85, cycleFigure([])).status).toBe("not_rated");
  });
});

describe("roCycles(lines) and cycleFigure(cycles)", () => {
  it("counts overlapping part waits once and clips them to the RO", () => {
    // RO open 1 March, last line closed 21 March (20 days); parts 5→15 and 10→25 March: union 5→21 = 16 days
    const c = roCycles([
      { ro: "A", opened: "2024-03-01", closed: "2024-03-02", ordered: "2024-03-05", received: "2024-03-15" },
      { ro: "A", opened: "2024-03-01", closed: "2024-03-21", ordered: "2024-03-10", received: "2024-03-25" },
      { ro: "B", opened: "2024-03-04", closed: "2024-03-04", ordered: null, received: null },
    ]);
    expect(c).toEqual([{ ro: "A", days: 20, waitingDays: 16 }, { ro: "B", days: 0, waitingDays: 0 }]);
    expect(unionDays([["2024-01-01", "2024-01-03"], ["2024-01-05", "2024-01-06"]], "2024-01-01", "2024-01-31")).toBe(3);
  });

  it("gives the median and p90 of the cycle and the share of cycle days spent waiting", () => {
    const f = cycleFigure([1, 2, 3, 4, 10].map((d, i) => ({ ro: String(i), days: d, waitingDays: d === 10 ? 8 : 0 })));
    // definition 7: median 3, p90 = 4 + 0.6·6 = 7.6; waiting 8 of 20 days
    expect(f).toMatchObject({ orders: 5, median: 3, p90: 7.6, ordersWaiting: 1, medianWaiting: 10 });
    expect(f.waitingShare).toBeCloseTo(0.4, 12);
  });

  it("gives the cycle median and the waiting days' median their distribution-free 95 % intervals", () => {
    // ten ROs: the published table of median intervals (Conover §3.2; n = 10 → x(2), x(9), 97.9 %)
    const days = [0, 1, 1, 2, 3, 4, 6, 9, 15, 40];
    const waiting = [0, 0, 0, 0, 1, 2, 2, 5, 8, 20];
    const f = cycleFigure(days.map((d, i) => ({ ro: String(i), days: d, waitingDays: waiting[i]! })));
    expect(f.median).toBe(3.5);
    expect(f.medianLimits).toMatchObject({ from: 1, to: 15 });
    expect(f.medianLimits!.coverage).toBeCloseTo(0.979, 3);
    // six ROs waited (1, 2, 2, 5, 8, 20 days): median 3.5, n = 6 → [x(1), x(6)] at 96.9 % (same table)
    expect(f.waitingDaysMedian).toBe(3.5);
    expect(f.waitingDaysLimits).toMatchObject({ from: 1, to: 20 });
    expect(f.waitingDaysLimits!.coverage).toBeCloseTo(0.969, 3);
    // five values are too few for a 95 % interval
    expect(cycleFigure([1, 2, 3, 4, 10].map((d, i) => ({ ro: String(i), days: d, waitingDays: 0 }))).medianLimits).toBeNull();
  });
});
