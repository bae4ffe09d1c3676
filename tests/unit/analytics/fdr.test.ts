import { describe, expect, it } from "vitest";
import { benjaminiHochberg, bonferroni } from "../../../server/analytics/fdr.js";
import { neuhausPValues } from "./fixtures/reference-datasets.js";

// Benjamini & Hochberg (1995), JRSS B 57:289–300, worked example (Neuhaus et al. 1992 p-values); adjusted values
// as printed in the SciPy documentation of scipy.stats.false_discovery_control, Examples (REFERENCE case G).
const publishedAdjusted = [
  0.0015, 0.003, 0.0095, 0.035625, 0.0603, 0.06385714, 0.06385714, 0.0645, 0.0765, 0.486, 0.58118182, 0.714875,
  0.75323077, 0.81321429, 1.0,
];

describe("benjaminiHochberg(pValues, rate)", () => {
  it("reproduces the adjusted p-values of the Benjamini–Hochberg worked example to 1e-8 (SciPy false_discovery_control docs; REFERENCE case G)", () => {
    const { adjusted } = benjaminiHochberg(neuhausPValues);
    adjusted.forEach((q, i) => expect(Math.abs(q - publishedAdjusted[i])).toBeLessThanOrEqual(1e-8));
  });

  it("rejects H(1)–H(4) at 5 %, although p(5) = 0.0201 is above its own threshold (Benjamini & Hochberg 1995; REFERENCE case G)", () => {
    const result = benjaminiHochberg(neuhausPValues, 0.05);
    expect(result.rejections).toBe(4);
    expect(result.rejected.slice(0, 4)).toEqual([true, true, true, true]);
    expect(result.rejected.slice(4).some(Boolean)).toBe(false);
  });

  it("returns the adjusted values in the input order when the input is shuffled (common practice, no source)", () => {
    const permutation = [14, 3, 0, 9, 7, 1, 12, 5, 10, 2, 13, 6, 11, 4, 8];
    const shuffled = permutation.map((i) => neuhausPValues[i]);
    const { adjusted } = benjaminiHochberg(shuffled);
    permutation.forEach((original, k) => expect(Math.abs(adjusted[k] - publishedAdjusted[original])).toBeLessThanOrEqual(1e-8));
  });

  it("gives an empty result for no tests (common practice, no source)", () => {
    expect(benjaminiHochberg([])).toEqual({ adjusted: [], rejected: [], rejections: 0, rate: 0.05 });
  });

  it("rejects a p-value outside [0, 1] (common practice, no source)", () => {
    expect(() => benjaminiHochberg([0.2, 1.5])).toThrow(RangeError);
  });
});

describe("bonferroni(pValues, rate)", () => {
  it("rejects 3 of the 15 Benjamini–Hochberg example hypotheses at 5 % (Benjamini & Hochberg 1995; REFERENCE case G)", () => {
    expect(bonferroni(neuhausPValues).rejections).toBe(3);
  });
});
