import { describe, expect, it } from "vitest";
import {
  poissonExactInterval,
  poissonExcessPValue,
  poissonRate,
  standardisedRatio,
} from "../../../server/analytics/poisson.js";
import { engineFans } from "./fixtures/reference-datasets.js";
import { expectNear } from "./fixtures/tolerance.js";


describe("poissonRate(events, exposure, per)", () => {
  it("reproduces Stata's exact limits 0.0047954–0.0183904 for 10 events in exposure 1000 (Statalist 2005-06, msg00803; REFERENCE case E)", () => {
    const r = poissonRate(10, 1000, 1)!;
    expect(r.rate).toBeCloseTo(0.01, 12);
    expect(r.lower).toBeCloseTo(0.0047954, 7);
    expect(r.upper).toBeCloseTo(0.0183904, 7);
  });

  it("gives 0.56 per 1,000 h, 95 % [0.225149, 1.153814] for 7 failures in 12,500 engine hours (library cross-check (R poisson.test / SciPy), per REFERENCE.md case E)", () => {
    const r = poissonRate(7, 12_500)!;
    expectNear(r.rate, 0.56, 1e-12);
    expectNear(r.lower, 0.225149, 1e-6, 6);
    expectNear(r.upper, 1.153814, 1e-6, 6);
  });

  it("gives 0.034839 per 1,000 h, [0.018002, 0.060857] for the 12 fan failures in 344,440 unit-hours (library cross-check (R survival / SciPy), per REFERENCE.md case B)", () => {
    const failures = engineFans.filter((u) => u.event === 1).length;
    const unitHours = engineFans.reduce((sum, u) => sum + u.time, 0);
    expect(failures).toBe(12);
    expect(unitHours).toBe(344_440);
    const r = poissonRate(failures, unitHours)!;
    expectNear(r.rate, 0.034839, 1e-5);
    expectNear(r.lower, 0.018002, 1e-5);
    expectNear(r.upper, 0.060857, 1e-5);
  });

  it("returns null when there is no exposure (common practice, no source)", () => {
    expect(poissonRate(3, 0)).toBeNull();
  });
});

describe("poissonExactInterval(count)", () => {
  it("returns 0 and 3.689 for no events (R epitools pois.exact documentation; REFERENCE case E)", () => {
    const ci = poissonExactInterval(0);
    expect(ci.lower).toBe(0);
    expect(ci.upper).toBeCloseTo(3.689, 3);
  });

  it("returns 17.793–39.284 for 27 events (Stata [R] ci manual, from memory; COMPUTED identically, per REFERENCE.md case E)", () => {
    const ci = poissonExactInterval(27);
    expect(ci.lower).toBeCloseTo(17.793, 3);
    expect(ci.upper).toBeCloseTo(39.284, 3);
    expectNear(ci.lower, 17.79317, 1e-6, 6);
    expectNear(ci.upper, 39.283582, 1e-6, 6);
  });

  it("returns 0.0253–5.5716 for one event (Garwood 1936, Biometrika 28:437 table, from memory; REFERENCE case E)", () => {
    const ci = poissonExactInterval(1);
    expect(ci.lower).toBeCloseTo(0.0253, 4);
    expect(ci.upper).toBeCloseTo(5.5716, 4);
    expectNear(ci.lower, 0.025318, 1e-6, 6);
    expectNear(ci.upper, 5.571643, 1e-6, 6);
  });

  it.each([
    [2, 0.242209, 7.224688],
    [3, 0.618672, 8.767273],
    [5, 1.623486, 11.668332],
    [10, 4.795389, 18.390356],
  ])("returns the limits for %i events to rel 1e-6 (library cross-check (R poisson.test / SciPy chi2.ppf), per REFERENCE.md case E)", (x, lower, upper) => {
    const ci = poissonExactInterval(x);
    expectNear(ci.lower, lower, 1e-6, 6);
    expectNear(ci.upper, upper, 1e-6, 6);
  });

  it("rejects a fractional count (common practice, no source)", () => {
    expect(() => poissonExactInterval(2.5)).toThrow(RangeError);
  });
});

describe("standardisedRatio(observed, expected)", () => {
  it("divides the Garwood limits of the observed count by the expected count (REFERENCE case E count row x = 10)", () => {
    const sr = standardisedRatio(10, 4)!;
    expect(sr.ratio).toBe(2.5);
    expectNear(sr.lower, 4.795389 / 4, 1e-6, 6);
    expectNear(sr.upper, 18.390356 / 4, 1e-6, 6);
  });

  it("returns null when nothing was expected (common practice, no source)", () => {
    expect(standardisedRatio(3, 0)).toBeNull();
  });
});

describe("poissonExcessPValue(observed, expected)", () => {
  it("is 0.025 when the expected count equals the Garwood 95 % lower limit, which that limit is defined by (Garwood 1936; REFERENCE case E x = 10, 27)", () => {
    expect(poissonExcessPValue(10, 4.795388696)).toBeCloseTo(0.025, 8);
    expect(poissonExcessPValue(27, 17.79317013)).toBeCloseTo(0.025, 8);
  });

  it("equals 1 − e^(−μ) for at least one event, the Poisson zero term (common practice, no source)", () => {
    expect(poissonExcessPValue(1, 0.3)).toBeCloseTo(1 - Math.exp(-0.3), 14);
  });

  it("equals 1 − Σ_{k<3} e^(−μ) μ^k / k! for three events (common practice, no source)", () => {
    const mu = 2.2;
    const below = Math.exp(-mu) * (1 + mu + (mu * mu) / 2);
    expect(poissonExcessPValue(3, mu)).toBeCloseTo(1 - below, 14);
  });

  it("is 1 for no events and 0 for events where none were expected (common practice, no source)", () => {
    expect(poissonExcessPValue(0, 5)).toBe(1);
    expect(poissonExcessPValue(4, 0)).toBe(0);
  });

  it("keeps relative accuracy far in the tail: 30 events where 2 were expected (common practice, no source: dominant-term bound)", () => {
    const p = poissonExcessPValue(30, 2);
    // P(X ≥ 30) lies between its first term P(X = 30) and P(X = 30) / (1 − μ/31).
    let first = Math.exp(-2);
    for (let k = 1; k <= 30; k++) first *= 2 / k;
    expect(p).toBeGreaterThanOrEqual(first);
    expect(p).toBeLessThanOrEqual(first / (1 - 2 / 31));
  });
});
