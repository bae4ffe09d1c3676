import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { binomialTwoSidedPValue, clopperPearsonInterval, compareRates } from "../../../server/analytics/rate-ratio.js";
import { expectNear } from "./fixtures/tolerance.js";

// R's own example for two samples (stats::poisson.test help page, "eba1977, compare Fredericia to other three
// cities for ages 55-59"): poisson.test(c(11, 6+8+7), c(800, 1083+1050+878)). Its printed output
// "count1 = 11, expected count1 = 6.7174, p-value = 0.07967 … 95 percent confidence interval: 0.8584264 4.2772659
// … rate ratio 1.971488" is as reproduced in a public validation note of another statistics library (read when
// this test was written) and agrees with the output as remembered (from memory).
describe("compareRates(11, 800, 21, 3011)", () => {
  const c = compareRates(11, 800, 21, 3011)!;

  it("gives the rate ratio 1.971488 (R poisson.test help-page example, printed output)", () => {
    expectNear(c.ratio!, 1.971488, 1e-6, 6);
  });

  it("gives expected count1 = 6.7174 under equal rates (R poisson.test help-page example, printed output)", () => {
    expectNear(c.expectedA, 6.7174, 1e-5, 4);
  });

  it("gives the two-sided p-value 0.07967 (R poisson.test help-page example, printed output)", () => {
    expectNear(c.pValue, 0.07967, 1e-4, 5);
  });

  it("gives the exact 95 % interval 0.8584264–4.2772659 (R poisson.test help-page example, printed output)", () => {
    expectNear(c.lower, 0.8584264, 1e-7, 7);
    expectNear(c.upper!, 4.2772659, 1e-7, 7);
  });

  it("reports rates per 1,000 units of exposure (arithmetic written out: 1000 × 11/800 = 13.75)", () => {
    expect(c.rateA).toBeCloseTo(13.75, 12);
    expect(c.rateB).toBeCloseTo((1000 * 21) / 3011, 12);
  });
});

// Further cases: library cross-check (SciPy 1.17.1 stats.binomtest(x1, n, t1/(t1+t2)).pvalue and
// .proportion_ci(method="exact") mapped by p/(1−p)·t2/t1), computed for this test, not in REFERENCE.md.
describe("compareRates against SciPy's exact binomial test", () => {
  it.each([
    [3, 12_000, 19, 15_500, 0.004314754676, 0.03865358725, 0.692832517],
    [240, 410_000, 180, 520_000, 9.498847798e-8, 1.388076066, 2.063159531],
  ])("(%i in %i h, %i in %i h) gives p %f and limits %f–%f (library cross-check (SciPy binomtest))", (x1, t1, x2, t2, p, lo, hi) => {
    const c = compareRates(x1, t1, x2, t2)!;
    expectNear(c.pValue, p, 1e-8);
    expectNear(c.lower, lo, 1e-8);
    expectNear(c.upper!, hi, 1e-8);
  });

  it("gives ratio 0, lower limit 0 and upper 0.8325768 when group A has no events (library cross-check (SciPy binomtest))", () => {
    const c = compareRates(0, 5000, 7, 6000)!;
    expect(c.ratio).toBe(0);
    expect(c.lower).toBe(0);
    expectNear(c.upper!, 0.8325767761, 1e-8);
    expectNear(c.pValue, 0.0183741909, 1e-8);
  });

  it("leaves the ratio and the upper limit unbounded (null) when group B has no events (Clopper–Pearson upper limit 1 at x = n; common practice, no source)", () => {
    const c = compareRates(4, 5000, 0, 6000)!;
    expect(c.ratio).toBeNull();
    expect(c.upper).toBeNull();
    expect(c.lower).toBeGreaterThan(0);
  });

  it("returns null without exposure or without any event (R binom.test refuses n = 0; common practice, no source)", () => {
    expect(compareRates(3, 0, 2, 100)).toBeNull();
    expect(compareRates(0, 100, 0, 100)).toBeNull();
  });
});

// The reduction: given n = x1 + x2, x1 ~ Bin(n, p). jStat 1.9.6 (already a dependency) computes the binomial
// probabilities independently, so the two-sided p-value must equal the sum of jStat's pmf over the outcomes no
// more likely than the observed one (R binom.test's rule, tolerance 1 + 1e-7) — a library cross-check.
describe("binomialTwoSidedPValue(x, n, p)", () => {
  const byJStat = (x: number, n: number, p: number) => {
    const d = jStat.binomial.pdf(x, n, p) * (1 + 1e-7);
    let sum = 0;
    for (let k = 0; k <= n; k++) if (jStat.binomial.pdf(k, n, p) <= d) sum += jStat.binomial.pdf(k, n, p);
    return Math.min(1, sum);
  };

  it.each([
    [11, 32, 800 / 3811],
    [3, 22, 12_000 / 27_500],
    [9, 20, 0.3],
    [1, 40, 0.1],
    [38, 40, 0.8],
  ])("equals the sum of jStat's binomial pmf over outcomes no more likely than x = %i of n = %i (library cross-check (jStat 1.9.6))", (x, n, p) => {
    expectNear(binomialTwoSidedPValue(x, n, p), byJStat(x, n, p), 1e-9);
  });

  it("is 1 when x equals the expected count n·p (R binom.test rule)", () => {
    expect(binomialTwoSidedPValue(5, 10, 0.5)).toBe(1);
  });

  it("counts an outcome whose probability ties the observed one as 'as extreme' (R binom.test relative tolerance 1 + 1e-7): x = 3 of 10 at p = 0.5 gives 2·P(X ≤ 3) = 0.34375 (arithmetic written out: 176/1024 × 2)", () => {
    expect(binomialTwoSidedPValue(3, 10, 0.5)).toBeCloseTo(352 / 1024, 12);
  });
});

describe("clopperPearsonInterval(x, n)", () => {
  it("gives 0.25273675–0.36762192 for 81/263 (library cross-check (SciPy 1.17.1 binomtest proportion_ci method 'exact'), computed for this test)", () => {
    const ci = clopperPearsonInterval(81, 263);
    expectNear(ci.lower, 0.25273675, 1e-7);
    expectNear(ci.upper, 0.36762192, 1e-7);
  });

  it("is [0, 1 − (α/2)^(1/n)] for x = 0 (closed form of the Beta quantile; arithmetic written out)", () => {
    const ci = clopperPearsonInterval(0, 20);
    expect(ci.lower).toBe(0);
    expectNear(ci.upper, 1 - 0.025 ** (1 / 20), 1e-9);
  });

  it("throws RangeError for n = 0 (common practice, no source)", () => {
    expect(() => clopperPearsonInterval(0, 0)).toThrow(RangeError);
  });
});
