import { describe, expect, it } from "vitest";
import { pWords, rateComparisonSentence, twoFigures } from "../../../server/analytics/comparison-words.js";
import { compareRates } from "../../../server/analytics/rate-ratio.js";

describe("rateComparisonSentence(labelA, labelB, comparison)", () => {
  it("reads R's poisson.test example as 'fails 2.0 times as often … (95 % CI 0.86–4.3, p = 0.080)' (numbers: R poisson.test help-page example, see rate-ratio.test.ts)", () => {
    expect(rateComparisonSentence("lot A", "lot B", compareRates(11, 800, 21, 3011))).toBe(
      "Lot A fails 2.0 times as often as lot B per 1,000 engine hours (95 % CI 0.86–4.3, p = 0.080).",
    );
  });

  it("says the ratio is unbounded when group B had no failures (common practice, no source)", () => {
    expect(rateComparisonSentence("shop S1", "shop S2", compareRates(3, 1000, 0, 1000))).toMatch(/^Shop S1 had 3 failures and shop S2 none, so the ratio per 1,000 engine hours is unbounded \(95 % CI [\d.]+–unbounded, p = 0\.250\)\.$/);
  });

  it("says why there is no comparison (common practice, no source)", () => {
    expect(rateComparisonSentence("lot X", "all other lots", null)).toMatch(/cannot be compared/);
  });
});

describe("twoFigures(v) and pWords(p)", () => {
  it("rounds to two significant figures without exponents and reads small p as '< 0.001' (common practice, no source)", () => {
    expect([twoFigures(2.4449), twoFigures(0.4249), twoFigures(123.4), twoFigures(0)]).toEqual(["2.4", "0.42", "123", "0"]);
    expect([pWords(0.0004), pWords(0.00431)]).toEqual(["p < 0.001", "p = 0.004"]);
  });
});
