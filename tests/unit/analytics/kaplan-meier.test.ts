import { describe, expect, it } from "vitest";
import { kaplanMeier, kaplanMeierQuantile, logRankTest, survivalAt } from "../../../server/analytics/kaplan-meier.js";
import { placeboArm, sixMpArm } from "./fixtures/reference-datasets.js";

// REFERENCE case D: Freireich et al. (1963) 6-MP arm. S(t) to 4 d.p. is PUBLISHED in Le, Introductory
// Biostatistics (2003), Example 11.1 / Table 11.1; SE and the three interval types are a library cross-check
// (R survival survfit / independent numpy), per REFERENCE.md.
const table: {
  t: number;
  n: number;
  d: number;
  s: number;
  se: number;
  log: [number, number];
  plain: [number, number];
  loglog: [number, number];
}[] = [
  { t: 6, n: 21, d: 3, s: 0.8571, se: 0.07636, log: [0.719817, 1.0], plain: [0.707479, 1.0], loglog: [0.619718, 0.951552] },
  { t: 7, n: 17, d: 1, s: 0.8067, se: 0.086935, log: [0.653124, 0.996444], plain: [0.636333, 0.977113], loglog: [0.563147, 0.922809] },
  { t: 10, n: 15, d: 1, s: 0.7529, se: 0.09635, log: [0.585919, 0.967575], plain: [0.564099, 0.941783], loglog: [0.5032, 0.889362] },
  { t: 13, n: 12, d: 1, s: 0.6902, se: 0.106815, log: [0.509613, 0.934769], plain: [0.480843, 0.899549], loglog: [0.43161, 0.849066] },
  { t: 16, n: 11, d: 1, s: 0.6275, se: 0.114054, log: [0.439394, 0.895995], plain: [0.40391, 0.850992], loglog: [0.367511, 0.804912] },
  { t: 22, n: 7, d: 1, s: 0.5378, se: 0.128234, log: [0.337037, 0.858201], plain: [0.286482, 0.789149], loglog: [0.267779, 0.746791] },
  { t: 23, n: 6, d: 1, s: 0.4482, se: 0.134591, log: [0.248788, 0.807372], plain: [0.184385, 0.711974], loglog: [0.188052, 0.680143] },
];

const within = (actual: number | null, expected: number, tolerance: number): void => {
  expect(actual).not.toBeNull();
  expect(Math.abs(actual! - expected)).toBeLessThanOrEqual(tolerance);
};

describe("kaplanMeier(observations)", () => {
  const curve = kaplanMeier(sixMpArm);

  it("counts the units censored at a failure time in that time's risk set: 21 at 6 weeks, 15 at 10 weeks (REFERENCE case D tie convention; Le 2003 Table 11.1)", () => {
    expect(curve.steps.map((s) => [s.time, s.atRisk, s.events])).toEqual(table.map((r) => [r.t, r.n, r.d]));
  });

  it("reproduces Le's printed survival column to 4 d.p., including 80.67 % at 7 weeks and 53.78 % at 22 weeks (Le, Introductory Biostatistics 2003, Example 11.1)", () => {
    curve.steps.forEach((step, i) => within(step.survival, table[i].s, 0.00005 + 1e-12));
  });

  it("gives the Greenwood standard errors to 1e-5 (library cross-check (R survival), per REFERENCE.md case D)", () => {
    curve.steps.forEach((step, i) => within(step.stdError, table[i].se, 1e-5));
  });

  it("gives the log-transformed 95 % limits, with Le's printed S(7) interval (.6531, .9964) (Le 2003; library cross-check (R survival conf.type 'log'), per REFERENCE.md case D)", () => {
    curve.steps.forEach((step, i) => {
      within(step.lower, table[i].log[0], 1e-5);
      within(step.upper, table[i].log[1], 1e-5);
    });
    within(curve.steps[1].lower, 0.6531, 0.00005);
    within(curve.steps[1].upper, 0.9964, 0.00005);
  });

  it("gives the plain 95 % limits clipped to 1 (library cross-check (R survival conf.type 'plain'), per REFERENCE.md case D)", () => {
    kaplanMeier(sixMpArm, { confidenceType: "plain" }).steps.forEach((step, i) => {
      within(step.lower, table[i].plain[0], 1e-5);
      within(step.upper, table[i].plain[1], 1e-5);
    });
  });

  it("gives the log-log 95 % limits (library cross-check (R survival conf.type 'log-log'), per REFERENCE.md case D)", () => {
    kaplanMeier(sixMpArm, { confidenceType: "log-log" }).steps.forEach((step, i) => {
      within(step.lower, table[i].loglog[0], 1e-5);
      within(step.upper, table[i].loglog[1], 1e-5);
    });
  });

  it("gives median survival 23 weeks with 95 % limits [16, not reached] (library cross-check (R print(survfit)), per REFERENCE.md case D)", () => {
    expect(curve.median).toEqual({ estimate: 23, lower: 16, upper: null });
  });

  it("reads the step curve between failure times (REFERENCE case D: S = 0.8571 from 6 up to 7 weeks)", () => {
    expect(survivalAt(curve, 5.9)).toBe(1);
    within(survivalAt(curve, 6.5), 0.8571, 0.00005);
    within(survivalAt(curve, 40), 0.4482, 0.00005);
  });
});

describe("kaplanMeier(observations) with delayed entry", () => {
  it("leaves a unit out of the risk set until after its entry age (DOMAIN.md: entry < tᵢ ≤ exit; arithmetic written out)", () => {
    // Failures at 2 and 5; a third unit enters at 3 and is censored at 8.
    // At 2: at risk {A, B} (C not yet entered) → S = 1 − 1/2 = 0.5. At 5: at risk {B, C} → S = 0.5 × (1 − 1/2) = 0.25.
    const curve = kaplanMeier([
      { time: 2, event: 1 },
      { time: 5, event: 1 },
      { time: 8, event: 0, entry: 3 },
    ]);
    expect(curve.steps.map((s) => [s.atRisk, s.survival])).toEqual([
      [2, 0.5],
      [2, 0.25],
    ]);
  });

  it("does not count a unit at risk at exactly its entry age (DOMAIN.md: entry < tᵢ)", () => {
    const curve = kaplanMeier([
      { time: 3, event: 1 },
      { time: 9, event: 0 },
      { time: 9, event: 0, entry: 3 },
    ]);
    expect(curve.steps[0].atRisk).toBe(2);
  });
});

describe("logRankTest(groupA, groupB)", () => {
  it("gives χ² = 16.8 on 1 df, 9 observed vs 19.3 expected failures in the 6-MP arm against placebo (Freireich et al. 1963 as the R MASS gehan data, survdiff output from memory)", () => {
    const test = logRankTest(sixMpArm, placeboArm);
    expect(test.observedA).toBe(9);
    expect(test.observedB).toBe(21);
    expect(Math.abs(test.expectedA - 19.3)).toBeLessThan(0.05);
    expect(Math.abs(test.expectedB - 10.7)).toBeLessThan(0.05);
    expect(Math.abs(test.statistic - 16.8)).toBeLessThan(0.05);
    expect(test.pValue).toBeLessThan(1e-4);
  });

  it("gives χ² = 16.792941, p = 4.16881e-5 (library cross-check (SciPy 1.17.1 stats.logrank), computed for this test, not in REFERENCE.md)", () => {
    const test = logRankTest(sixMpArm, placeboArm);
    expect(Math.abs(test.statistic - 16.792941)).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(test.pValue - 4.168809e-5)).toBeLessThanOrEqual(1e-10);
  });

  it("gives a statistic of 0 when the groups are identical (common practice, no source)", () => {
    expect(logRankTest(sixMpArm, sixMpArm).statistic).toBeCloseTo(0, 12);
  });
});

// R survival's conventions for quantiles of a survfit curve: the help page of quantile.survfit (survival
// package, man/quantile.survfit.Rd: "it is possible for the curve to have a horizontal segment at exactly 1-k,
// in which case the midpoint of the horizontal segment is returned … If the survival curve does not fall to
// 1-k, then that quantile is undefined", with the tolerance sqrt(.Machine$double.eps) for round-off) and its
// code (R/quantile.survfit.R, findq: a flat stretch at the end runs to the last time observed).
describe("kaplanMeierQuantile(curve, p)", () => {
  it("returns the midpoint 10.5 for the median of 20 uncensored distinct times, where the product (19/20)…(10/11) stands for 0.5 (R survival quantile.survfit help page, its own example)", () => {
    const curve = kaplanMeier(Array.from({ length: 20 }, (_, i) => ({ time: i + 1, event: 1 as const })));
    expect(kaplanMeierQuantile(curve, 0.5).estimate).toBe(10.5);
    expect(curve.median.estimate).toBe(10.5);
  });

  it("takes the midpoint of a flat stretch that runs to the end of the curve: failures at 1 and 2, censored at 3 and 4 → median (2 + 4)/2 = 3 (R survival quantile.survfit help page: midpoint of the horizontal segment; R/quantile.survfit.R findq: the end of the curve is the last time)", () => {
    const curve = kaplanMeier([
      { time: 1, event: 1 },
      { time: 2, event: 1 },
      { time: 3, event: 0 },
      { time: 4, event: 0 },
    ]);
    expect(curve.lastTime).toBe(4);
    expect(kaplanMeierQuantile(curve, 0.5).estimate).toBe(3);
  });

  it("reports a quantile the curve never reaches as null, not the last time: the 6-MP curve stops at 0.4482, so F = 0.6 has no estimate, while the lower band (0.3370 at 22 weeks, REFERENCE case D) does reach 0.4 (R survival quantile.survfit help page: 'that quantile is undefined')", () => {
    const curve = kaplanMeier(sixMpArm);
    expect(kaplanMeierQuantile(curve, 0.6)).toEqual({ p: 0.6, estimate: null, lower: 22, upper: null });
  });

  it("reports an upper band that never falls to 0.5 as not reached (null), even where S itself reaches 0 (R survival: limits NA where S = 0, dropped by quantile.survfit; arithmetic written out for 3 failures at 1, 2, 3)", () => {
    // S = 2/3, 1/3, 0. Upper (log) = min(1, S·exp(1.96·√Σ d/(n(n−d)))): 1 at t = 1 and t = 2, undefined at t = 3.
    const curve = kaplanMeier([1, 2, 3].map((time) => ({ time, event: 1 as const })));
    expect(curve.median).toEqual({ estimate: 2, lower: 1, upper: null });
  });

  it("gives B10 = 6 weeks with limits [6, 16] for the 6-MP arm (REFERENCE case D table: S(6) = 0.8571, lower band 0.7198 at 6, upper band 0.8960 at 16 is the first below 0.9; read by R survival quantile.survfit's rule)", () => {
    expect(kaplanMeierQuantile(kaplanMeier(sixMpArm), 0.1)).toEqual({ p: 0.1, estimate: 6, lower: 6, upper: 16 });
  });

  it("throws RangeError for p outside (0, 1) (common practice, no source)", () => {
    expect(() => kaplanMeierQuantile(kaplanMeier(sixMpArm), 0)).toThrow(RangeError);
    expect(() => kaplanMeierQuantile(kaplanMeier(sixMpArm), 1)).toThrow(RangeError);
  });
});

describe("kaplanMeier(observations) where S reaches 0", () => {
  it("leaves the standard error and both limits undefined (null), not 0, at and after S = 0 (R survival survfit: std.err and limits NA where the curve is 0)", () => {
    const curve = kaplanMeier([1, 2, 3].map((time) => ({ time, event: 1 as const })));
    const last = curve.steps.at(-1)!;
    expect(last.survival).toBe(0);
    expect(last.stdError).toBeNull();
    expect(last.lower).toBeNull();
    expect(last.upper).toBeNull();
    for (const type of ["plain", "log-log"] as const) {
      const step = kaplanMeier([1, 2, 3].map((time) => ({ time, event: 1 as const })), { confidenceType: type }).steps.at(-1)!;
      expect([step.stdError, step.lower, step.upper]).toEqual([null, null, null]);
    }
  });
});
