import { describe, expect, it } from "vitest";
import { addEfficiency, labourEfficiency, partsWait, share } from "../../../server/analytics/kpis.js";

// Formulas from DOMAIN.md §3 "Shop KPIs" (common practice, no source); the examples are computed by hand.
// The interval of a share is the Wilson interval, checked against Newcombe (1998) in proportion.test.ts.

describe("labourEfficiency(lines, standardHours, actualHours)", () => {
  it("divides the standard hours by the actual hours", () => {
    // three lines: standard 1.5 + 2.0 + 0.5 = 4.0 h; actual 1.0 + 2.5 + 0.5 = 4.0 h → 4.0/4.0 = 1.00
    expect(labourEfficiency(3, 4.0, 4.0).ratio).toBe(1);
    // standard 3.3 h done in 3.0 h → 3.3/3.0 = 1.10 (beats the standard by 10 %)
    expect(labourEfficiency(2, 3.3, 3.0).ratio).toBeCloseTo(1.1, 12);
  });

  it("adds sums before dividing, not ratios", () => {
    // month 1: 10 h standard in 8 h (1.25); month 2: 2 h standard in 4 h (0.5)
    // quarter: (10 + 2)/(8 + 4) = 12/12 = 1.00, not the mean of ratios (1.25 + 0.5)/2 = 0.875
    const q = addEfficiency(labourEfficiency(5, 10, 8), labourEfficiency(1, 2, 4));
    expect(q).toEqual({ lines: 6, standardHours: 12, actualHours: 12, ratio: 1 });
  });

  it("has no ratio when no actual time was booked", () => {
    expect(labourEfficiency(0, 0, 0).ratio).toBeNull();
  });
});

describe("partsWait(histogram)", () => {
  it("gives the median and the 90th percentile with linear interpolation (R type 7)", () => {
    // waits 1, 2, 3, 4, 10 days: median = x(3) = 3;
    // p90: h = (5 − 1) × 0.9 = 3.6 → x(4) + 0.6 × (x(5) − x(4)) = 4 + 0.6 × 6 = 7.6
    const w = partsWait([[10, 1], [1, 1], [3, 1], [2, 1], [4, 1]]);
    expect(w.n).toBe(5);
    expect(w.median).toBe(3);
    expect(w.p90).toBeCloseTo(7.6, 12);
  });

  it("expands the histogram's counts", () => {
    // 0 days × 3, 55 days × 1: values 0, 0, 0, 55 → median (0 + 0)/2 = 0; p90: h = 3 × 0.9 = 2.7 → 0 + 0.7 × 55 = 38.5
    const w = partsWait(new Map([[0, 3], [55, 1]]));
    expect(w).toEqual({ n: 4, median: 0, p90: expect.closeTo(38.5, 12) });
  });

  it("is empty, not zero, without any part received", () => {
    expect(partsWait([])).toEqual({ n: 0, median: null, p90: null });
  });
});

describe("share(successes, n)", () => {
  it("keeps the counts and attaches the 95 % Wilson interval", () => {
    // 81 of 263 is Newcombe's (1998) Table I row 1: 0.2553–0.3662
    const s = share(81, 263);
    expect(s.estimate!.proportion).toBeCloseTo(81 / 263, 12);
    expect(s.estimate!.lower).toBeCloseTo(0.2553, 4);
    expect(s.estimate!.upper).toBeCloseTo(0.3662, 4);
  });

  it("has no estimate for n = 0", () => {
    expect(share(0, 0).estimate).toBeNull();
  });
});
