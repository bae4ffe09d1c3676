import { describe, expect, it } from "vitest";
import {
  compareWeibull,
  fitWeibull,
  weibullLogLikelihood,
  weibullPlotPoints,
  weibullQuantile,
  weibullRankRegression,
  weibullSurvival,
  type WeibullFit,
} from "../../../server/analytics/weibull.js";
import type { LifeObservation } from "../../../server/analytics/life-data.js";
import { chiSquareQuantile } from "../../../server/analytics/distributions.js";
import { ballBearings, engineFans } from "./fixtures/reference-datasets.js";
import { expectNear } from "./fixtures/tolerance.js";

function fitted(observations: readonly LifeObservation[], level?: number): WeibullFit {
  const fit = fitWeibull(observations, { level });
  if (fit.status !== "fitted") throw new Error(`expected a fit, got ${fit.reason}`);
  return fit;
}

const significantFigures = (x: number, digits: number): number => Number(x.toPrecision(digits));

describe("fitWeibull(observations) on complete data", () => {
  const fit = fitted(ballBearings);

  it("reproduces the Lieblein–Zelen ball-bearing shape 2.102 (Dekking et al., exercise on deep-groove ball bearings; Lawless) and scale 81.88 (Lawless, from memory)", () => {
    expect(significantFigures(fit.shape, 4)).toBe(2.102);
    expect(significantFigures(fit.scale, 4)).toBe(81.88);
  });

  it("gives shape 2.1020589 and scale 81.878334 to rel 1e-6 (library cross-check (R survival survreg / SciPy), per REFERENCE.md case A)", () => {
    expectNear(fit.shape, 2.1020589, 1e-6, 7);
    expectNear(fit.scale, 81.878334, 1e-6, 6);
  });

  it("gives log-likelihood −113.69129 in millions of revolutions (library cross-check (R survival / SciPy), per REFERENCE.md case A)", () => {
    expect(Math.abs(fit.logLikelihood - -113.69129)).toBeLessThanOrEqual(1e-4);
  });

  it("gives observed-information standard errors 0.328687 and 8.60045 (library cross-check (R survival), per REFERENCE.md case A)", () => {
    expectNear(fit.shapeStdError, 0.328687, 1e-3);
    expectNear(fit.scaleStdError, 8.60045, 1e-3);
  });

  it("gives shape 2.063 when 68.64 appears only once, as in the 22-value textbook listing (COMPUTED, per REFERENCE.md case A)", () => {
    const first = ballBearings.findIndex((o) => o.time === 68.64);
    const once = ballBearings.filter((_, i) => i !== first);
    expect(once).toHaveLength(22);
    expect(significantFigures(fitted(once).shape, 4)).toBe(2.063);
  });

  it("returns 90 % profile-likelihood limits where the deviance 2(ℓ̂ − ℓ_profile) equals χ²₁(0.90) (definition of the LR interval; common practice, no source)", () => {
    const critical = chiSquareQuantile(0.9, 1);
    // With complete data the scale that maximises ℓ at a fixed shape is (Σ t^β / n)^{1/β}.
    const profile = (beta: number): number => {
      const eta = (ballBearings.reduce((s, o) => s + o.time ** beta, 0) / ballBearings.length) ** (1 / beta);
      return weibullLogLikelihood(ballBearings, beta, eta);
    };
    for (const limit of [fit.shapeInterval!.lower!, fit.shapeInterval!.upper!]) {
      expect(2 * (fit.logLikelihood - profile(limit))).toBeCloseTo(critical, 6);
    }
  });

  it("gives 90 % LR intervals β 1.59392–2.67459, η 68.2571–97.3928, B10 18.0783–38.6900 (library cross-check (SciPy 1.17.1 brentq over scipy profile likelihoods), computed for this test, not in REFERENCE.md)", () => {
    expectNear(fit.shapeInterval!.lower!, 1.5939208, 1e-6);
    expectNear(fit.shapeInterval!.upper!, 2.6745913, 1e-6);
    expectNear(fit.scaleInterval!.lower!, 68.257072, 1e-6);
    expectNear(fit.scaleInterval!.upper!, 97.392842, 1e-6);
    expectNear(fit.b10Interval!.lower!, 18.078316, 1e-6);
    expectNear(fit.b10Interval!.upper!, 38.689995, 1e-6);
  });
});

describe("fitWeibull(observations) with right censoring", () => {
  const fit = fitted(engineFans);

  it("reproduces shape 1.0584 and scale 26.2968 thousand hours for the 70 diesel-engine fans (SAS/QC PROC RELIABILITY Getting Started, Nelson 1982 p. 318, figures from memory; COMPUTED identically, per REFERENCE.md case B)", () => {
    expect(significantFigures(fit.shape, 5)).toBe(1.0584);
    expect(significantFigures(fit.scale / 1000, 6)).toBe(26.2968);
  });

  it("gives shape 1.0584458 and scale 26296.845 h to rel 1e-6 (library cross-check (R survival survreg on genfan / SciPy), per REFERENCE.md case B)", () => {
    expectNear(fit.shape, 1.0584458, 1e-6, 7);
    expectNear(fit.scale, 26296.845, 1e-6, 3);
  });

  it("matches R survreg's extreme-value location log η = 3.269449 (thousands of hours) and σ = 1/β = 0.944781 (library cross-check (R survival), per REFERENCE.md case B)", () => {
    expectNear(Math.log(fit.scale / 1000), 3.269449, 1e-6, 6);
    expectNear(1 / fit.shape, 0.944781, 1e-6, 6);
  });

  it("gives standard errors 0.268251 and 12251.4 h (library cross-check (R survival), per REFERENCE.md case B)", () => {
    expectNear(fit.shapeStdError, 0.268251, 1e-3);
    expectNear(fit.scaleStdError, 12251.4, 1e-3);
  });

  it("gives log-likelihood −135.15272 in hours and −52.259657 in thousands of hours (library cross-check (R survival / SciPy), per REFERENCE.md case B)", () => {
    expect(Math.abs(fit.logLikelihood - -135.15272)).toBeLessThanOrEqual(1e-4);
    const thousands = fitted(engineFans.map((o) => ({ ...o, time: o.time / 1000 })));
    expect(Math.abs(thousands.logLikelihood - -52.259657)).toBeLessThanOrEqual(1e-4);
  });

  it("gives B10 life 3137.24 h and median life 18600.24 h (library cross-check (R survival / SciPy), per REFERENCE.md case B)", () => {
    expectNear(fit.b10, 3137.24, 1e-5);
    expectNear(weibullQuantile(0.1, fit.shape, fit.scale), 3137.24, 1e-5);
    expectNear(weibullQuantile(0.5, fit.shape, fit.scale), 18600.24, 1e-5);
    expect(weibullSurvival(fit.b10, fit.shape, fit.scale)).toBeCloseTo(0.9, 12);
  });
});

describe("fitWeibull(observations) with delayed entry", () => {
  // The fans of REFERENCE case B observed only from 1,000 h: units gone by then are dropped, the rest enter at 1,000 h.
  const truncated = engineFans.filter((o) => o.time > 1000).map((o) => ({ ...o, entry: 1000 }));

  it("maximises L = Π f(t)^δ S(t)^(1−δ) / S(entry): shape 0.377495, scale 63202.1 h, ln L −121.64831 (library cross-check (SciPy 1.17.1 Nelder–Mead + BFGS on the full two-parameter likelihood), computed for this test, not in REFERENCE.md)", () => {
    const fit = fitted(truncated);
    expect(fit.delayedEntry).toBe(true);
    expectNear(fit.shape, 0.37749508, 1e-6);
    expectNear(fit.scale, 63202.134, 1e-6);
    expect(Math.abs(fit.logLikelihood - -121.64831)).toBeLessThanOrEqual(1e-4);
  });

  it("divides by S(entry): the log-likelihood rises by Σ (entry/η)^β over the same data without entry (definition; common practice, no source)", () => {
    const withoutEntry = truncated.map(({ entry: _entry, ...o }) => o);
    const shift = truncated.length * (1000 / 50_000) ** 1.3;
    expect(weibullLogLikelihood(truncated, 1.3, 50_000) - weibullLogLikelihood(withoutEntry, 1.3, 50_000)).toBeCloseTo(shift, 10);
  });

  it("reports an unbounded lower limit when the profile likelihood stays flat down to the edge of the shape range (common practice, no source)", () => {
    // As β → 0 this truncated sample's likelihood levels off, so no finite lower 90 % limit exists.
    expect(fitted(truncated).shapeInterval!.lower).toBeNull();
  });
});

describe("fitWeibull(observations) with too few failures", () => {
  it("returns a typed insufficient result below 5 failures (DOMAIN.md: fit only with ≥ 5 failures)", () => {
    const failures = engineFans.filter((o) => o.event === 1).slice(0, 4);
    const survivors = engineFans.filter((o) => o.event === 0);
    expect(fitWeibull([...failures, ...survivors])).toEqual({
      status: "insufficient",
      reason: "too-few-failures",
      failures: 4,
      minimumFailures: 5,
    });
  });

  it("rejects an entry age at or after the exit age (common practice, no source)", () => {
    expect(() => fitWeibull([{ time: 10, event: 1, entry: 10 }])).toThrow(RangeError);
  });
});

describe("weibullRankRegression(observations, direction)", () => {
  it("regresses Y on X with Bernard ranks: shape 2.18123, scale 81.5776 (library cross-check (R lm / numpy polyfit), per REFERENCE.md case C)", () => {
    const rry = weibullRankRegression(ballBearings, "y-on-x")!;
    expectNear(rry.shape, 2.18123, 1e-5, 5);
    expectNear(rry.scale, 81.5776, 1e-5, 4);
  });

  it("regresses X on Y with Bernard ranks: shape 2.24789, scale 80.9724 (library cross-check (R lm / numpy polyfit), per REFERENCE.md case C)", () => {
    const rrx = weibullRankRegression(ballBearings, "x-on-y")!;
    expectNear(rrx.shape, 2.24789, 1e-5, 5);
    expectNear(rrx.scale, 80.9724, 1e-5, 4);
  });

  it("reports the probability-plot r² 0.970344 for both directions (library cross-check (R / numpy), per REFERENCE.md case C)", () => {
    for (const direction of ["y-on-x", "x-on-y"] as const) {
      expect(Math.abs(weibullRankRegression(ballBearings, direction)!.rSquared - 0.970344)).toBeLessThanOrEqual(1e-6);
    }
  });
});

describe("weibullPlotPoints(observations)", () => {
  it("uses ranks 1…n and Bernard's (i − 0.3)/(n + 0.4) when nothing is censored (REFERENCE case C method)", () => {
    const points = weibullPlotPoints(ballBearings);
    points.forEach((p, i) => {
      expect(p.adjustedRank).toBeCloseTo(i + 1, 12);
      expect(p.medianRank).toBeCloseTo((i + 1 - 0.3) / 23.4, 12);
    });
  });

  it("adjusts the ranks after censored units by Johnson's method (Johnson 1964 adjusted rank, from memory; arithmetic written out)", () => {
    // n = 5: F10, C20, F30, F40, C50.  j = (reverse rank × previous + n + 1)/(reverse rank + 1):
    // F10: (5·0 + 6)/6 = 1;  F30: (3·1 + 6)/4 = 2.25;  F40: (2·2.25 + 6)/3 = 3.5.
    const points = weibullPlotPoints([
      { time: 10, event: 1 },
      { time: 20, event: 0 },
      { time: 30, event: 1 },
      { time: 40, event: 1 },
      { time: 50, event: 0 },
    ]);
    expect(points.map((p) => p.adjustedRank)).toEqual([1, 2.25, 3.5]);
    expect(points[1].medianRank).toBeCloseTo((2.25 - 0.3) / 5.4, 14);
  });

  it("ranks a failure before a censored unit at the same age (common practice, no source)", () => {
    const points = weibullPlotPoints([
      { time: 20, event: 0 },
      { time: 20, event: 1 },
      { time: 30, event: 1 },
    ]);
    // F20 first: (3·0 + 4)/4 = 1; then C20; F30 has reverse rank 1: (1·1 + 4)/2 = 2.5.
    expect(points.map((p) => p.adjustedRank)).toEqual([1, 2.5]);
  });
});

describe("compareWeibull(groupA, groupB)", () => {
  it("finds a scale ratio of exactly 1/2 and no shape difference when group B is group A with every time doubled (Weibull scale equivariance; common practice, no source)", () => {
    const doubled = ballBearings.map((o) => ({ ...o, time: 2 * o.time }));
    const result = compareWeibull(ballBearings, doubled);
    if (result.status !== "compared") throw new Error("expected a comparison");
    expect(result.commonShape.shape).toBeCloseTo(result.groupA.shape, 8);
    expect(result.scaleRatio.estimate).toBeCloseTo(0.5, 8);
    expect(result.hazardRatio.estimate).toBeCloseTo(2 ** result.commonShape.shape, 8);
    expect(result.sameShape.statistic).toBeLessThan(1e-8);
    expect(result.sameDistribution.pValue).toBeLessThan(0.05);
  });

  it("finds nothing when a group is compared with itself (common practice, no source)", () => {
    const result = compareWeibull(engineFans, engineFans);
    if (result.status !== "compared") throw new Error("expected a comparison");
    expect(result.scaleRatio.estimate).toBeCloseTo(1, 8);
    expect(result.sameDistribution.statistic).toBeLessThan(1e-8);
    expect(result.scaleRatio.lower! * result.scaleRatio.upper!).toBeCloseTo(1, 6);
  });

  // REFERENCE case B fans split by list position (even rows = A, odd rows = B).
  const a = engineFans.filter((_, i) => i % 2 === 0);
  const b = engineFans.filter((_, i) => i % 2 === 1);

  it("fits the common-shape model β 1.0591870, η_A 25343.114, η_B 27193.827 h, ln L −135.144366 (library cross-check (SciPy 1.17.1 BFGS on the 3-parameter likelihood), computed for this test, not in REFERENCE.md)", () => {
    const result = compareWeibull(a, b);
    if (result.status !== "compared") throw new Error("expected a comparison");
    expectNear(result.commonShape.shape, 1.0591870, 1e-6);
    expectNear(result.commonShape.scaleA, 25343.114, 1e-6);
    expectNear(result.commonShape.scaleB, 27193.827, 1e-6);
    expect(Math.abs(result.commonShape.logLikelihood - -135.1443657)).toBeLessThanOrEqual(1e-6);
  });

  it("gives LR statistics 0.0167084 (same distribution) and 0.301741 (same shape) and 90 % LR intervals 0.343793–2.50558 (scale ratio), 0.409366–2.83618 (hazard ratio) (library cross-check (SciPy 1.17.1 Nelder–Mead profiles + brentq), computed for this test, not in REFERENCE.md)", () => {
    const result = compareWeibull(a, b);
    if (result.status !== "compared") throw new Error("expected a comparison");
    expect(Math.abs(result.sameDistribution.statistic - 0.01670843)).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(result.sameShape.statistic - 0.30174142)).toBeLessThanOrEqual(1e-6);
    expect(result.sameDistribution.df).toBe(1);
    expectNear(result.scaleRatio.lower!, 0.34379275, 1e-6);
    expectNear(result.scaleRatio.upper!, 2.5055781, 1e-6);
    expectNear(result.hazardRatio.lower!, 0.40936589, 1e-6);
    expectNear(result.hazardRatio.upper!, 2.8361754, 1e-6);
  });

  it("returns insufficient when either group has fewer than 5 failures (DOMAIN.md)", () => {
    const few = engineFans.filter((o) => o.event === 0).concat(engineFans.filter((o) => o.event === 1).slice(0, 3));
    expect(compareWeibull(engineFans, few).status).toBe("insufficient");
  });
});
