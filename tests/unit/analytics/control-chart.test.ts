import { describe, expect, it } from "vitest";
import { uChart } from "../../../server/analytics/control-chart.js";

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
