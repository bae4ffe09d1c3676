import { describe, expect, it } from "vitest";
import {
  benchmarkProportion,
  funnelLimitExact,
  funnelLimits,
  wilsonInterval,
} from "../../../server/analytics/proportion.js";
import { expectNear } from "./fixtures/tolerance.js";

describe("wilsonInterval(successes, n)", () => {
  // Newcombe (1998), Statistics in Medicine 17:857–872, Table I, method 3 (score, no continuity correction),
  // published to 4 d.p. (from memory, corroborated by a public test file); full precision is the library
  // cross-check (R prop.test(correct = FALSE) / SciPy), per REFERENCE.md case F.
  it.each([
    [81, 263, 0.2553, 0.3662, 0.255289, 0.36621],
    [15, 148, 0.0624, 0.1605, 0.062386, 0.160487],
    [0, 20, 0.0, 0.1611, 0.0, 0.161125],
    [1, 29, 0.0061, 0.1718, 0.006113, 0.171755],
  ])("gives Newcombe's Table I interval for %i/%i", (x, n, lo4, hi4, lo6, hi6) => {
    const ci = wilsonInterval(x, n)!;
    expectNear(ci.lower, lo4, 0, 4);
    expectNear(ci.upper, hi4, 0, 4);
    expect(Math.abs(ci.lower - lo6)).toBeLessThanOrEqual(1e-6);
    expect(Math.abs(ci.upper - hi6)).toBeLessThanOrEqual(1e-6);
  });

  it("returns null when there is nothing to divide by (common practice, no source)", () => {
    expect(wilsonInterval(0, 0)).toBeNull();
  });
});

describe("funnelLimits(target, n)", () => {
  // Spiegelhalter (2005), Statistics in Medicine 24:1185–1202, appendix on proportions (method); the values are
  // a library cross-check (R qbinom/pbinom/dbinom, SciPy binom), per REFERENCE.md case H, target 8 %.
  const table: [number, [number, number], [number, number], [number, number], [number, number]][] = [
    [25, [0, 0.18634], [0, 0.24767], [0, 0.18453], [0, 0.27152]],
    [50, [0.0048, 0.1552], [0, 0.19856], [0.00284, 0.15385], [0, 0.2114]],
    [100, [0.02683, 0.13317], [0, 0.16384], [0.0254, 0.13217], [0.00366, 0.16953]],
    [250, [0.04637, 0.11363], [0.02698, 0.13302], [0.04586, 0.11327], [0.0299, 0.13554]],
    [1000, [0.06319, 0.09681], [0.05349, 0.10651], [0.06309, 0.09672], [0.05421, 0.10718]],
  ];
  it.each(table)("reproduces the 95 % and 99.8 % normal and exact-interpolated limits at n = %i", (n, n95, n998, e95, e998) => {
    const f = funnelLimits(0.08, n);
    const pairs: [{ lower: number; upper: number }, [number, number]][] = [
      [f.normal95, n95],
      [f.normal998, n998],
      [f.exact95, e95],
      [f.exact998, e998],
    ];
    for (const [band, [lower, upper]] of pairs) {
      expectNear(band.lower, lower, 0, 5);
      expectNear(band.upper, upper, 0, 5);
    }
  });

  it("clamps the interpolated lower limit −0.03196 at n = 25 to 0 (REFERENCE case H note)", () => {
    // Before clamping: r = 0, P(R ≤ 0) = 0.92^25, α = (0.92^25 − 0.025)/0.92^25, limit = −α/25.
    const p0 = 0.92 ** 25;
    expect(-((p0 - 0.025) / p0) / 25).toBeCloseTo(-0.03196, 5);
    expect(funnelLimitExact(0.08, 25, 0.025)).toBe(0);
  });
});

describe("benchmarkProportion(successes, n, groupRate)", () => {
  it("flags a shop only when its Wilson lower limit is above the group rate (DOMAIN.md shop KPIs, common practice [C])", () => {
    // 81/263 has Wilson lower limit 0.2553 (Newcombe 1998 Table I): above a 0.20 group rate, below 0.30.
    expect(benchmarkProportion(81, 263, 0.2).flagged).toBe(true);
    expect(benchmarkProportion(81, 263, 0.3).flagged).toBe(false);
  });

  it("suppresses denominators below 30 and never flags them (DOMAIN.md shop KPIs, common practice [C])", () => {
    const b = benchmarkProportion(20, 29, 0.05);
    expect(b.suppressed).toBe(true);
    expect(b.estimate).toBeNull();
    expect(b.flagged).toBe(false);
    expect(benchmarkProportion(20, 30, 0.05).suppressed).toBe(false);
  });
});
