import { describe, expect, it } from "vitest";
import { weibullBLife } from "../../../server/analytics/b-life.js";
import { fitWeibull, type WeibullFit } from "../../../server/analytics/weibull.js";
import { ballBearings, engineFans } from "./fixtures/reference-datasets.js";
import { expectNear } from "./fixtures/tolerance.js";

const fitted = (rows: typeof ballBearings): WeibullFit => {
  const fit = fitWeibull(rows);
  if (fit.status !== "fitted") throw new Error("expected a fit");
  return fit;
};

describe("weibullBLife(observations, fit, p)", () => {
  const bearings = fitted(ballBearings);

  it("gives B10 with the same 90 % interval 18.0783–38.6900 as the fit's own B10 (library cross-check (SciPy 1.17.1 profile likelihood), per tests/unit/analytics/weibull.test.ts; REFERENCE case A data)", () => {
    const b = weibullBLife(ballBearings, bearings, 0.1);
    expectNear(b.estimate, bearings.b10, 1e-12);
    expectNear(b.lower!, 18.078316, 1e-6);
    expectNear(b.upper!, 38.689995, 1e-6);
    expect(b.level).toBe(0.9);
  });

  it.each([
    [0.5, 68.777415, 55.672818, 82.553979],
    [0.01, 9.178215, 4.218821, 15.826325],
    [0.3, 50.138843, 37.821944, 62.49341],
  ])("gives B%s of the ball bearings with its 90 %% LR interval (library cross-check (SciPy 1.17.1 minimize + brentq on the profile likelihood), computed for this test, not in REFERENCE.md)", (p, estimate, lower, upper) => {
    const b = weibullBLife(ballBearings, bearings, p);
    expectNear(b.estimate, estimate, 1e-6);
    expectNear(b.lower!, lower, 1e-5);
    expectNear(b.upper!, upper, 1e-5);
  });

  it("gives the fans' median life B50 = 18600.24 h and B10 = 3137.24 h (library cross-check (R survival / SciPy), per REFERENCE.md case B)", () => {
    const fans = fitted(engineFans);
    expectNear(weibullBLife(engineFans, fans, 0.5).estimate, 18600.24, 1e-5);
    expectNear(weibullBLife(engineFans, fans, 0.1).estimate, 3137.24, 1e-5);
  });

  it("throws RangeError for p outside (0, 1) (common practice, no source)", () => {
    expect(() => weibullBLife(ballBearings, bearings, 0)).toThrow(RangeError);
    expect(() => weibullBLife(ballBearings, bearings, 1.2)).toThrow(RangeError);
  });
});
