import { describe, expect, it } from "vitest";
import { kpiFigures, pct, round3, shareFigure } from "../../../server/analytics/benchmark-figures.js";
import { buildLedger, sumCells } from "../../../server/analytics/benchmark-ledger.js";
import { share } from "../../../server/analytics/kpis.js";

// Wilson intervals: Newcombe (1998), Statistics in Medicine 17:857–872, Table I, method 3 (REFERENCE.md case F):
// 81/263 → 0.2553–0.3662, 1/29 → 0.0061–0.1718. Percentiles: R type 7 (Hyndman & Fan 1996, definition 7),
// worked by hand. Labour efficiency: Σ standard ÷ Σ actual (DOMAIN.md §3, common practice, no source). Rounding
// of a peer's rate to 0.1 % is the product's anonymity rule (docs/api.md; common practice, no source).

describe("shareFigure(share, peer, emptyNote, minimum)", () => {
  it("gives a named shop its count, rate and Newcombe's interval", () => {
    const f = shareFigure(share(81, 263), false, "none");
    expect(f).toMatchObject({ successes: 81, n: 263, note: null });
    expect(f.value).toBeCloseTo(81 / 263, 12);
    expect(f.lower!).toBeCloseTo(0.2553, 4);
    expect(f.upper!).toBeCloseTo(0.3662, 4);
  });

  it("gives a peer its rate rounded to 0.1 % and nothing else", () => {
    // 81/263 = 0.307985 → 0.308
    expect(shareFigure(share(81, 263), true, "none")).toEqual({ value: 0.308, lower: null, upper: null, successes: null, n: null, note: null });
  });

  it("does not rate fewer lines than the minimum, and says why a share is empty", () => {
    expect(shareFigure(share(1, 29), false, "none", 30)).toEqual({ value: null, lower: null, upper: null, successes: 1, n: 29, note: "fewer than 30 lines: not rated" });
    expect(shareFigure(share(1, 29), true, "none", 30)).toMatchObject({ successes: null, n: null, note: "fewer than 30 lines: not rated" });
    expect(shareFigure(share(0, 0), false, "no part lines")).toMatchObject({ value: null, n: 0, note: "no part lines" });
    expect(shareFigure(share(1, 29), false, "none").lower!).toBeCloseTo(0.0061, 4);
  });
});

describe("kpiFigures(cell, peer, anyClaims)", () => {
  const cell = (() => {
    const ledger = buildLedger([], [{ shop: "A", month: "2024-01", effLines: 2, standardHours: 3.3, actualHours: 3.0, partLines: 263, backOrdered: 81, coldStartJobs: 0, coldStartMeasured: 0 }],
      [10, 1, 3, 2, 4].map((days) => ({ shop: "A", month: "2024-01", days, lines: 1 })), "2024-06-30", { days: 30, hours: 100 });
    return sumCells(ledger, ["A"], ["2024-01"], new Map([["A|2024-01", { shop: "A", month: "2024-01", claims: 29, onTime: 1 }]]));
  })();

  it("computes labour efficiency, parts wait and the shares of a named shop", () => {
    const k = kpiFigures(cell, false, true);
    // 3.3 standard hours done in 3.0 → 1.10
    expect(k.efficiency).toMatchObject({ standardHours: 3.3, actualHours: 3.0, lines: 2, note: null });
    expect(k.efficiency.value).toBeCloseTo(1.1, 12);
    // waits 1, 2, 3, 4, 10 days: median 3; p90 h = 4 × 0.9 = 3.6 → 4 + 0.6 × 6 = 7.6
    expect(k.partsWait).toEqual({ median: 3, p90: 7.6, n: 5, note: null });
    expect(k.backOrder.lower!).toBeCloseTo(0.2553, 4);
    expect(k.coldStartMeasured).toMatchObject({ value: null, note: "no cold-start jobs" });
    expect(k.warrantyOnTime.upper!).toBeCloseTo(0.1718, 4);
  });

  it("withholds a peer's sums and counts", () => {
    const k = kpiFigures(cell, true, true);
    expect(k.efficiency).toEqual({ value: 1.1, standardHours: null, actualHours: null, lines: null, note: null });
    expect(k.partsWait.n).toBeNull();
    expect(k.backOrder).toMatchObject({ value: 0.308, n: null });
  });

  it("says there is no claim data yet while the group has no decided claim", () => {
    expect(kpiFigures(cell, false, false).warrantyOnTime).toEqual({ value: null, lower: null, upper: null, successes: null, n: null, note: "no data yet: no warranty claims have been recorded" });
  });
});

describe("round3(x) and pct(x)", () => {
  it("round to 0.001 and write a proportion as a percentage to 0.1", () => {
    expect(round3(0.2553)).toBe(0.255);
    expect(round3(null)).toBeNull();
    expect(pct(0.2553)).toBe("25.5 %");
  });
});
