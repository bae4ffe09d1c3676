import { describe, expect, it } from "vitest";
import {
  addDays,
  calibratedCount,
  calibratedProbability,
  coldFactor,
  convolvePmf,
  credibilityRatio,
  conditionalFailureProbability,
  forecastCount,
  lastCompleteSeason,
  leadTimeSummary,
  negativeBinomialPmf,
  nextSeason,
  orderBy,
  pmfQuantile,
  poissonBinomialPmf,
  stockToHold,
  weibullHazardIncrement,
} from "../../../server/analytics/winter-forecast.js";

describe("conditionalFailureProbability(age, hours, shape, scale, k)", () => {
  it("matches a hand-worked Weibull example: β = 2, η = 1000 h, a = 500 h, h = 200 h", () => {
    // Worked by hand from the Weibull survival S(t) = exp(−(t/η)^β) and P(fail in (a, a+h] | alive at a) = 1 − S(a+h)/S(a):
    // ΔH = (700/1000)^2 − (500/1000)^2 = 0.49 − 0.25 = 0.24;  p = 1 − e^−0.24 = 1 − 0.786627861 = 0.213372139
    expect(weibullHazardIncrement(500, 200, 2, 1000)).toBeCloseTo(0.24, 12);
    expect(conditionalFailureProbability(500, 200, 2, 1000)).toBeCloseTo(0.213372139, 9);
  });

  it("scales the cumulative hazard by the cold factor: k = 2 doubles ΔH (p = 1 − e^−0.48 = 0.381216960)", () => {
    // hand arithmetic: e^−0.48 = 0.618783392
    expect(conditionalFailureProbability(500, 200, 2, 1000, 2)).toBeCloseTo(0.38121661, 8);
  });

  it("is memoryless when β = 1: p = 1 − e^(−h/η) whatever the age (the exponential distribution's lack of memory, any probability text; from memory)", () => {
    const expected = 1 - Math.exp(-300 / 5000);
    expect(conditionalFailureProbability(0, 300, 1, 5000)).toBeCloseTo(expected, 12);
    expect(conditionalFailureProbability(4000, 300, 1, 5000)).toBeCloseTo(expected, 12);
  });

  it("rises with age when β > 1 (wear-out) and falls with age when β < 1 (infant mortality)", () => {
    expect(conditionalFailureProbability(3000, 500, 1.8, 9000)).toBeGreaterThan(conditionalFailureProbability(500, 500, 1.8, 9000));
    expect(conditionalFailureProbability(3000, 500, 0.7, 9000)).toBeLessThan(conditionalFailureProbability(500, 500, 0.7, 9000));
  });

  it("refuses a negative age or a non-positive shape", () => {
    expect(() => conditionalFailureProbability(-1, 10, 2, 1000)).toThrow(RangeError);
    expect(() => conditionalFailureProbability(1, 10, 0, 1000)).toThrow(RangeError);
  });
});

describe("coldFactor(rateRatios, shopShares, fitShares)", () => {
  it("is Σ w_shop·RR ÷ Σ w_fit·RR: RR = (2, 1), shop (0.5, 0.5), fit (0.25, 0.75) gives 1.5 ÷ 1.25 = 1.2 (hand arithmetic)", () => {
    expect(coldFactor([2, 1], [0.5, 0.5], [0.25, 0.75])).toBeCloseTo(1.2, 12);
  });

  it("is 1 when the shop's climate is the fit's own", () => {
    expect(coldFactor([3.7, 1.8, 0.4, 0.07], [0.1, 0.2, 0.3, 0.4], [0.1, 0.2, 0.3, 0.4])).toBeCloseTo(1, 12);
  });

  it("leaves a band without a measured ratio out of both sums", () => {
    // bands kept: the first two, shop (0.4, 0.4) → renormalised (0.5, 0.5); fit (0.25, 0.75): 1.5 ÷ 1.25 = 1.2
    expect(coldFactor([2, 1, null], [0.4, 0.4, 0.2], [0.25, 0.75, 0])).toBeCloseTo(1.2, 12);
  });
});

describe("poissonBinomialPmf(ps)", () => {
  it("gives P(0) = 0.4, P(1) = 0.5, P(2) = 0.1 for p = (0.5, 0.2) (by hand: 0.5·0.8, 0.5·0.8 + 0.5·0.2, 0.5·0.2)", () => {
    const pmf = poissonBinomialPmf([0.5, 0.2]);
    expect(pmf[0]).toBeCloseTo(0.4, 14);
    expect(pmf[1]).toBeCloseTo(0.5, 14);
    expect(pmf[2]).toBeCloseTo(0.1, 14);
  });

  it("is the binomial when every p is equal: n = 10, p = 0.3 against the cumulative binomial table (e.g. Montgomery & Runger, Applied Statistics and Probability for Engineers, appendix table of cumulative binomial probabilities; values from memory, four places)", () => {
    const pmf = poissonBinomialPmf(Array(10).fill(0.3));
    const cdf = (k: number) => Array.from(pmf).slice(0, k + 1).reduce((s, x) => s + x, 0);
    const table: [number, number][] = [[0, 0.0282], [1, 0.1493], [2, 0.3828], [3, 0.6496], [4, 0.8497], [5, 0.9527], [6, 0.9894]];
    for (const [k, p] of table) expect(cdf(k)).toBeCloseTo(p, 4);
    expect(pmf.reduce((s, x) => s + x, 0)).toBeCloseTo(1, 12);
  });

  it("refuses a probability outside [0, 1]", () => {
    expect(() => poissonBinomialPmf([0.2, 1.5])).toThrow(RangeError);
  });
});

describe("forecastCount(ps)", () => {
  it("gives Σp and the 5 % / 95 % points: binomial(10, 0.3) → 3, [1, 5] (same table: P(X ≤ 0) = 0.0282 < 0.05 ≤ 0.1493 = P(X ≤ 1); P(X ≤ 4) = 0.8497 < 0.95 ≤ 0.9527 = P(X ≤ 5))", () => {
    const c = forecastCount(Array(10).fill(0.3));
    expect(c.expected).toBeCloseTo(3, 12);
    expect(c.lower).toBe(1);
    expect(c.upper).toBe(5);
  });

  it("gives 0 and [0, 0] with no parts at risk", () => {
    expect(forecastCount([])).toEqual({ expected: 0, lower: 0, upper: 0 });
  });

  it("pmfQuantile refuses a level outside (0, 1)", () => {
    expect(() => pmfQuantile([1], 1)).toThrow(RangeError);
  });
});

describe("stockToHold(meanDemand, serviceLevel)", () => {
  // Cumulative Poisson table for mean 5 (e.g. Montgomery & Runger, Applied Statistics and Probability for Engineers,
  // appendix table of cumulative Poisson probabilities; values from memory, four places): P(X ≤ 7) = 0.8666,
  // P(X ≤ 8) = 0.9319, P(X ≤ 9) = 0.9682.
  it("holds 8 for mean 5 at 90 % (P(X ≤ 7) = 0.8666 < 0.90 ≤ 0.9319 = P(X ≤ 8))", () => {
    expect(stockToHold(5, 0.9)).toBe(8);
  });

  it("steps exactly at the table's cumulative values for mean 5", () => {
    expect(stockToHold(5, 0.866)).toBe(7);
    expect(stockToHold(5, 0.867)).toBe(8);
    expect(stockToHold(5, 0.931)).toBe(8);
    expect(stockToHold(5, 0.932)).toBe(9);
    expect(stockToHold(5, 0.968)).toBe(9);
    expect(stockToHold(5, 0.969)).toBe(10);
  });

  it("needs none when no demand is expected, and refuses a service level of 1", () => {
    expect(stockToHold(0, 0.95)).toBe(0);
    expect(() => stockToHold(2, 1)).toThrow(RangeError);
  });
});

describe("leadTimeSummary(days)", () => {
  it("gives R's type 7 median and 90th percentile (Hyndman & Fan 1996, definition 7): 1…10 → 5.5 and 1 + 0.9·9 = 9.1", () => {
    const s = leadTimeSummary([10, 9, 8, 7, 6, 5, 4, 3, 2, 1]);
    expect(s.lines).toBe(10);
    expect(s.median).toBeCloseTo(5.5, 12);
    expect(s.p90).toBeCloseTo(9.1, 12);
  });

  it("gives nulls with no lines", () => {
    expect(leadTimeSummary([])).toEqual({ lines: 0, median: null, p90: null });
  });
});

describe("seasons and dates", () => {
  it("nextSeason(end) is the 1 November – 31 March after the data's end, or the rest of the winter the data ends in", () => {
    expect(nextSeason("2025-06-30")).toEqual({ from: "2025-11-01", to: "2026-03-31" });
    expect(nextSeason("2025-03-31")).toEqual({ from: "2025-11-01", to: "2026-03-31" });
    expect(nextSeason("2025-11-15")).toEqual({ from: "2025-11-16", to: "2026-03-31" });
    expect(nextSeason("2026-12-31")).toEqual({ from: "2027-01-01", to: "2027-03-31" });
    expect(nextSeason("2027-02-10")).toEqual({ from: "2027-02-11", to: "2027-03-31" });
  });

  it("lastCompleteSeason(end) is the last 1 November – 31 March that ended by the data's end", () => {
    expect(lastCompleteSeason("2025-06-30")).toEqual({ from: "2024-11-01", to: "2025-03-31" });
    expect(lastCompleteSeason("2025-03-31")).toEqual({ from: "2024-11-01", to: "2025-03-31" });
    expect(lastCompleteSeason("2025-03-30")).toEqual({ from: "2023-11-01", to: "2024-03-31" });
  });

  it("orderBy(start, lead, today) is the start less the lead time (hand count: 17 Aug + 76 days = 1 Nov)", () => {
    expect(orderBy("2025-11-01", 76, "2025-07-01")).toEqual({ date: "2025-08-17", now: false });
    expect(orderBy("2025-11-01", 75.2, "2025-08-17")).toEqual({ date: "2025-08-17", now: true });
    expect(addDays("2024-02-28", 1)).toBe("2024-02-29");
  });
});

describe("credibilityRatio(observed, expected, a)", () => {
  // Clayton & Kaldor 1987 (Biometrics 43:671, "Empirical Bayes estimates of age-standardized relative risks"): with
  // O ~ Poisson(θE) and θ ~ Gamma(shape ν, rate α), the posterior mean of θ is (O + ν) ÷ (E + α); a prior of mean 1
  // has ν = α = a. Hand arithmetic below.
  it("is (O + a) ÷ (E + a): O = 4, E = 10, a = 10 gives 14 ÷ 20 = 0.7", () => {
    expect(credibilityRatio(4, 10, 10)).toBeCloseTo(0.7, 12);
  });

  it("pulls a short record towards 1 and leaves a long one near O ÷ E: O = 6, E = 2 gives 16 ÷ 12 = 1.3333 (raw 3); O = 600, E = 200 gives 610 ÷ 210 = 2.9048", () => {
    expect(credibilityRatio(6, 2, 10)).toBeCloseTo(16 / 12, 12);
    expect(credibilityRatio(600, 200, 10)).toBeCloseTo(2.904761905, 9);
  });

  it("is 1 when the shop shows exactly what the model expects, and with no record at all", () => {
    expect(credibilityRatio(7, 7, 10)).toBe(1);
    expect(credibilityRatio(0, 0, 10)).toBe(1);
  });

  it("refuses a negative count or a prior weight of 0", () => {
    expect(() => credibilityRatio(-1, 3)).toThrow(RangeError);
    expect(() => credibilityRatio(1, 3, 0)).toThrow(RangeError);
  });
});

describe("calibratedProbability(p, ratio)", () => {
  it("multiplies the cumulative hazard: p = 1 − e^−0.24 with ratio 2 is 1 − e^−0.48 = 0.381216608 (same hand example as above)", () => {
    const p = conditionalFailureProbability(500, 200, 2, 1000);
    expect(calibratedProbability(p, 2)).toBeCloseTo(conditionalFailureProbability(500, 200, 2, 1000, 2), 12);
    expect(calibratedProbability(p, 2)).toBeCloseTo(0.381216608, 8);
  });

  it("leaves p alone at ratio 1 and gives 1 − (1 − p)^r by hand: p = 0.5, r = 3 → 1 − 0.125 = 0.875", () => {
    expect(calibratedProbability(0.2, 1)).toBeCloseTo(0.2, 14);
    expect(calibratedProbability(0.5, 3)).toBeCloseTo(0.875, 14);
  });
});

describe("negativeBinomialPmf(shape, mean)", () => {
  it("matches the pmf C(k + r − 1, k)·q^r·(1 − q)^k by hand: r = 5, mean 10, q = 1/3 → P(0) = 1/243, P(1) = 10/729", () => {
    const pmf = negativeBinomialPmf(5, 10);
    expect(pmf[0]).toBeCloseTo(1 / 243, 12);
    expect(pmf[1]).toBeCloseTo(10 / 729, 12);
  });

  it("matches scipy.stats.nbinom(n = 5, p = 1/3): pmf(5) = 0.068282274, pmf(10) = 0.071435685, 5 % / 95 % points 3 and 20", () => {
    const pmf = negativeBinomialPmf(5, 10);
    expect(pmf[5]).toBeCloseTo(0.068282274, 8);
    expect(pmf[10]).toBeCloseTo(0.071435685, 8);
    expect(pmfQuantile(pmf, 0.05)).toBe(3);
    expect(pmfQuantile(pmf, 0.95)).toBe(20);
    expect(pmf.reduce((s, x) => s + x, 0)).toBeCloseTo(1, 10);
  });

  it("is the geometric distribution at shape 1: P(k) = (1/(1 + m))·(m/(1 + m))^k (any probability text; from memory)", () => {
    const pmf = negativeBinomialPmf(1, 3);
    for (const k of [0, 1, 4]) expect(pmf[k]).toBeCloseTo(0.25 * Math.pow(0.75, k), 12);
  });
});

describe("calibratedCount(cells)", () => {
  it("adds independent negative binomials by convolution: two of shape 6, mean 4 (q = 0.6) make shape 12, mean 8, whose 5 % / 95 % points are 3 and 15 (scipy.stats.nbinom(12, 0.6): cdf(2) = 0.0398, cdf(3) = 0.0905, cdf(14) = 0.9482, cdf(15) = 0.9663)", () => {
    const c = calibratedCount([{ expected: 4, shape: 6 }, { expected: 4, shape: 6 }]);
    expect(c).toEqual({ expected: 8, lower: 3, upper: 15 });
    const sum = convolvePmf(negativeBinomialPmf(6, 4, 60), negativeBinomialPmf(6, 4, 60));
    const direct = negativeBinomialPmf(12, 8, 120);
    for (const k of [0, 3, 8, 15]) expect(sum[k]).toBeCloseTo(direct[k], 12);
  });

  it("is wider than the Poisson-binomial count of the same mean: the ratio's uncertainty adds to the spread", () => {
    const nb = calibratedCount([{ expected: 20, shape: 30 }]);
    const pb = forecastCount(Array(200).fill(0.1));
    expect(nb.upper - nb.lower).toBeGreaterThan(pb.upper - pb.lower);
  });

  it("gives 0 and [0, 0] with nothing expected", () => {
    expect(calibratedCount([])).toEqual({ expected: 0, lower: 0, upper: 0 });
  });
});
