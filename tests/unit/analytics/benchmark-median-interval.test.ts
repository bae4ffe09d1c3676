import { describe, expect, it } from "vitest";
import { medianCoverage, medianInterval, medianRanks } from "../../../server/analytics/benchmark-median-interval.js";

// The method: W. J. Conover, Practical Nonparametric Statistics, 3rd ed. (Wiley 1999), §3.2, the confidence
// interval for a quantile, here the median (p = ½).

describe("medianRanks(n, level)", () => {
  // Ranks and coverage COMPUTED with a general-purpose reference library, SciPy 1.17.1 scipy.stats.binom:
  // coverage of [x(k), x(n−k+1)] = binom.cdf(n − k, n, ½) − binom.cdf(k − 1, n, ½), and the next ranks in, k + 1,
  // fall below 95 % (n = 8: 0.9296875; n = 11: 0.9345703; n = 17: 0.8565369). By hand for n = 10:
  // 1 − 2·P(B ≤ 1) = 1 − 2·(1 + 10)/1024 = 0.978515625.
  it.each([
    [8, 1, 8, 0.992],
    [9, 2, 8, 0.961],
    [10, 2, 9, 0.979],
    [11, 2, 10, 0.988],
    [12, 3, 10, 0.961],
    [13, 3, 11, 0.978],
    [15, 4, 12, 0.965],
    [17, 5, 13, 0.951],
    [20, 6, 15, 0.959],
  ])("gives n = %i the ranks (%i, %i) at coverage %f (scipy.stats.binom)", (n, lower, upper, coverage) => {
    const r = medianRanks(n)!;
    expect([r.lower, r.upper]).toEqual([lower, upper]);
    expect(r.coverage).toBeCloseTo(coverage, 3);
  });

  it("returns null when even the whole sample covers less than the level (n ≤ 5 at 95 %)", () => {
    // n = 5: [x(1), x(5)] covers 1 − 2/32 = 93.75 % (by hand)
    expect(medianRanks(5)).toBeNull();
    expect(medianCoverage(5, 1)).toBeCloseTo(0.9375, 10);
    expect(medianRanks(6)).toMatchObject({ lower: 1, upper: 6 });
  });

  it("uses the binomial coverage of the worked example of Real Statistics Using Excel (n = 35)", () => {
    // real-statistics.com, "Confidence Intervals for Order Statistics, Medians and Percentiles", Example 1: the
    // interval (x17, x19) around the median of 35 values has probability .264121 = BINOM.DIST(18) − BINOM.DIST(16)
    expect(medianCoverage(35, 17)).toBeCloseTo(0.264121, 6);
  });

  it("takes the narrowest ranks with coverage at least the level, for large n too", () => {
    // the normal approximation k ≈ n/2 − 1.96·√n/2 (Conover §3.2, large-sample ranks) lands within one rank
    for (const n of [50, 200, 1000, 4000]) {
      const r = medianRanks(n)!;
      expect(r.coverage).toBeGreaterThanOrEqual(0.95);
      expect(medianCoverage(n, r.lower + 1)).toBeLessThan(0.95);
      expect(Math.abs(r.lower - (n / 2 - (1.96 * Math.sqrt(n)) / 2))).toBeLessThanOrEqual(1.5);
    }
  });
});

describe("medianInterval(values)", () => {
  it("reads the limits at ranks k and n − k + 1 of the sorted values", () => {
    // ten invented cycle times, unsorted; n = 10 → ranks 2 and 9 (computed above)
    const r = medianInterval([9, 2, 14, 5, 3, 30, 7, 4, 11, 6])!;
    expect(r.median).toBe(6.5);
    expect(r.interval).toMatchObject({ lower: 2, upper: 9, from: 3, to: 14 });
  });

  it("gives the median without an interval below six values, and nothing for no values", () => {
    expect(medianInterval([4, 1, 3])).toEqual({ n: 3, median: 3, interval: null });
    expect(medianInterval([])).toBeNull();
  });
});
