import { describe, expect, it } from "vitest";
import { brentRoot, crossingFrom, goldenSectionMax, localMax } from "../../../server/analytics/numeric.js";

describe("brentRoot(f, a, b)", () => {
  it("finds √2 as the root of x² − 2 on [1, 2] (common practice, no source)", () => {
    expect(brentRoot((x) => x * x - 2, 1, 2)).toBeCloseTo(Math.SQRT2, 12);
  });

  it("refuses an interval without a sign change (Brent 1973: the method needs a bracket)", () => {
    expect(() => brentRoot((x) => x * x + 1, -1, 1)).toThrow(RangeError);
  });
});

describe("goldenSectionMax(f, lo, hi) and localMax(f, x0, step)", () => {
  it("finds the top of −(x − 0.3)² inside a bracket and from a distant start (common practice, no source)", () => {
    const f = (x: number): number => -((x - 0.3) ** 2);
    expect(goldenSectionMax(f, -1, 1).x).toBeCloseTo(0.3, 7);
    expect(localMax(f, 9, 0.05).x).toBeCloseTo(0.3, 7);
  });
});

describe("crossingFrom(g, target, x0, dir, step, limit)", () => {
  it("finds where x² reaches 4 on each side of 0 and reports none when g never gets there (common practice, no source)", () => {
    const g = (x: number): number => x * x;
    expect(crossingFrom(g, 4, 0, 1, 0.1, 50)).toBeCloseTo(2, 12);
    expect(crossingFrom(g, 4, 0, -1, 0.1, 50)).toBeCloseTo(-2, 12);
    expect(crossingFrom(() => 0, 4, 0, 1, 0.1, 50)).toBeNull();
  });
});
