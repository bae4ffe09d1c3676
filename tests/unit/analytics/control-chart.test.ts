import { describe, expect, it } from "vitest";
import { flaggedMonthWords, standardisedChart, uChart } from "../../../server/analytics/control-chart.js";
import { poissonQuantile } from "../../../server/analytics/distributions.js";

// Formula: NIST/SEMATECH e-Handbook of Statistical Methods, 6.3.3.2 — u chart, centre Σc/Σn, limits ū ± 3√(ū/n).
describe("uChart(points, per)", () => {
  it("puts the centre at total failures over total exposure and the limits at ±3√(ū/n)", () => {
    // ū = (4 + 6 + 20) / (1000 + 1000 + 1000) = 0.01 per hour; 3√(0.01/1000) = 0.009486833
    const chart = uChart([{ failures: 4, exposure: 1000 }, { failures: 6, exposure: 1000 }, { failures: 20, exposure: 1000 }], 1);
    expect(chart.centre).toBeCloseTo(0.01, 12);
    expect(chart.points[0].upper).toBeCloseTo(0.01 + 3 * Math.sqrt(0.01 / 1000), 12);
    expect(chart.points[0].lower).toBeCloseTo(0.01 - 3 * Math.sqrt(0.01 / 1000), 12);
    // 20/1000 = 0.020 > 0.019487 → out of control; 4/1000 = 0.004 > 0.000513 → in control
    expect(chart.points.map((p) => p.outOfControl)).toEqual([false, false, true]);
  });

  it("widens the limits for a period with less exposure and floors the lower limit at zero", () => {
    // ū = 10/10,100 ≈ 0.00099; for n = 100: 3√(ū/100) ≈ 0.00944 > ū → lower floored at 0
    const chart = uChart([{ failures: 0, exposure: 100 }, { failures: 10, exposure: 10_000 }], 1000);
    expect(chart.points[0].lower).toBe(0);
    expect(chart.points[0].upper! - chart.centre!).toBeGreaterThan(chart.points[1].upper! - chart.centre!);
  });

  it("has no rate and no limits for a period without exposure", () => {
    expect(uChart([{ failures: 0, exposure: 0 }, { failures: 1, exposure: 10 }]).points[0]).toEqual({ rate: null, lower: null, upper: null, outOfControl: false });
  });
});

// Cumulative Poisson table values (4 decimals), e.g. the Poisson tables of the CRC Standard Probability and
// Statistics Tables (from memory), checked here against the defining sum e^−λ Σ λ^k / k! as well:
//   λ = 10: F(1) = 0.0005, F(2) = 0.0028, F(20) = 0.9984, F(21) = 0.9993
//   λ = 2:  F(0) = 0.1353, F(6) = 0.9955, F(7) = 0.9989
const cdfBySum = (x: number, mean: number) => {
  let term = Math.exp(-mean);
  let sum = term;
  for (let k = 1; k <= x; k++) {
    term *= mean / k;
    sum += term;
  }
  return sum;
};

describe("poissonQuantile(p, mean), R's qpois convention", () => {
  it("matches the table: the 0.135 % and 99.865 % points of Poisson(10) are 2 and 21, of Poisson(2) 0 and 7", () => {
    expect(cdfBySum(1, 10)).toBeCloseTo(0.0005, 4);
    expect(cdfBySum(2, 10)).toBeCloseTo(0.0028, 4);
    expect(cdfBySum(20, 10)).toBeCloseTo(0.9984, 4);
    expect(cdfBySum(21, 10)).toBeCloseTo(0.9993, 4);
    expect(cdfBySum(6, 2)).toBeCloseTo(0.9955, 4);
    expect(cdfBySum(7, 2)).toBeCloseTo(0.9989, 4);
    expect(poissonQuantile(0.00135, 10)).toBe(2);
    expect(poissonQuantile(0.99865, 10)).toBe(21);
    expect(poissonQuantile(0.00135, 2)).toBe(0);
    expect(poissonQuantile(0.99865, 2)).toBe(7);
  });

  it("is the smallest x with F(x) ≥ p for large means too (the defining sum, 600 terms)", () => {
    for (const mean of [150.5, 420]) {
      for (const p of [0.00135, 0.5, 0.99865]) {
        const q = poissonQuantile(p, mean);
        expect(cdfBySum(q, mean)).toBeGreaterThanOrEqual(p);
        expect(cdfBySum(q - 1, mean)).toBeLessThan(p);
      }
    }
  });
});

describe("standardisedChart(points): observed ÷ expected with exact probability limits", () => {
  it("puts the limits at the Poisson quantiles of each period's expectation and flags beyond them only", () => {
    const [a, b, c, d] = standardisedChart([
      { observed: 21, expected: 10 },
      { observed: 22, expected: 10 },
      { observed: 1, expected: 10 },
      { observed: 0, expected: 0 },
    ]);
    expect([a.lowerCount, a.upperCount]).toEqual([2, 21]);
    expect(a.upper).toBeCloseTo(2.1, 12);
    expect(a.outOfControl).toBeNull(); // 21 is the upper limit itself: P(X ≥ 21 | 10) > 0.00135
    expect(b.outOfControl).toBe("above");
    expect(b.ratio).toBeCloseTo(2.2, 12);
    expect(c.outOfControl).toBe("below");
    expect(d).toMatchObject({ ratio: null, outOfControl: null });
  });

  it("says what a flagged month is in words, and nothing for a month inside the limits", () => {
    const [high, ok] = standardisedChart([{ observed: 22, expected: 10 }, { observed: 12, expected: 10 }]);
    expect(flaggedMonthWords("2024-03", high)).toBe(
      "March 2024: 22 failures where the month's engine hours, the fleet's ages and the weather predict 10 (2.20 times); at most 21 would be ordinary, so about 12 failures are more than the fleet's hours, ages and weather explain.",
    );
    expect(flaggedMonthWords("2024-04", ok)).toBeNull();
  });
});
