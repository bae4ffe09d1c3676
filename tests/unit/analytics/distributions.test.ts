import { describe, expect, it } from "vitest";
import jStat from "jstat";
import {
  binomialPmf,
  chiSquareQuantile,
  chiSquareUpperTail,
  normalQuantile,
  twoSidedZ,
} from "../../../server/analytics/distributions.js";

describe('import jStat from "jstat"', () => {
  it("arrives under ESM as the jStat object itself, with the distribution namespaces attached (checked against jStat 1.9.6 dist/jstat.js)", () => {
    expect(typeof jStat.chisquare.inv).toBe("function");
    expect(typeof jStat.lowRegGamma).toBe("function");
    expect(typeof jStat.gammaln).toBe("function");
  });
});

describe("twoSidedZ(level) and normalQuantile(p)", () => {
  it("gives z = 1.959964 for 95 % (REFERENCE.md conventions, 'z value')", () => {
    expect(twoSidedZ(0.95)).toBeCloseTo(1.959964, 6);
  });

  it("gives z = 3.090232 for the 99.8 % funnel (REFERENCE case H)", () => {
    expect(normalQuantile(0.999)).toBeCloseTo(3.090232, 6);
  });
});

describe("chiSquareQuantile(p, df) and chiSquareUpperTail(x, df)", () => {
  it("gives the 95 % point 3.841459 on 1 df and its 5 % tail back (standard chi-square table, from memory)", () => {
    const x = chiSquareQuantile(0.95, 1);
    expect(x).toBeCloseTo(3.841459, 6);
    expect(chiSquareUpperTail(x, 1)).toBeCloseTo(0.05, 10);
  });

  it("gives the 90 % point 2.705543 on 1 df used for 90 % likelihood-ratio intervals (standard chi-square table, from memory)", () => {
    expect(chiSquareQuantile(0.9, 1)).toBeCloseTo(2.705543, 6);
  });
});

describe("binomialPmf(r, n, p)", () => {
  it("equals C(n, r) p^r (1 − p)^(n − r) written out for r = 3 of 25 (common practice, no source)", () => {
    expect(binomialPmf(3, 25, 0.08)).toBeCloseTo(((25 * 24 * 23) / 6) * 0.08 ** 3 * 0.92 ** 22, 10);
  });

  it("sums to 1 over all outcomes even for n = 20,000, where the binomial coefficient alone overflows (common practice, no source)", () => {
    let total = 0;
    for (let k = 0; k <= 20_000; k++) total += binomialPmf(k, 20_000, 0.08);
    expect(total).toBeCloseTo(1, 8);
  });
});
