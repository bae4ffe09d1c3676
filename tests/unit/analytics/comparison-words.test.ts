import { describe, expect, it } from "vitest";
import { lifeComparisonWords, pWords, rateComparisonSentence, twoFigures } from "../../../server/analytics/comparison-words.js";
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

describe("lifeComparisonWords(part, a, b)", () => {
  // words only: the B10 figures themselves are checked against published Weibull cases in weibull.test.ts
  it("reads the two B10 lives and how many times shorter the first is", () => {
    expect(
      lifeComparisonWords("heater-plug sets", { label: "lot X", b10: 688.4, units: 410, failures: 75 }, { label: "the other lots", b10: 2510.6, units: 2300, failures: 120 }),
    ).toBe("Life: 10 % of heater-plug sets from lot X have failed by 688 h, against 2,511 h for the other lots (about 3.6 times shorter); B10 of Weibull fits over 410 and 2,300 fitted parts.");
  });
  it("says nothing when either side has no fit, and no 'shorter' when the first lives longer", () => {
    expect(lifeComparisonWords("plugs", { label: "lot X", b10: null, units: 3, failures: 0 }, { label: "others", b10: 900, units: 50, failures: 9 })).toBeNull();
    expect(lifeComparisonWords("plugs", { label: "lot X", b10: 1200, units: 30, failures: 5 }, { label: "others", b10: 900, units: 50, failures: 9 })).not.toMatch(/shorter/);
  });
});
