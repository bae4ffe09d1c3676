import { describe, expect, it } from "vitest";
import { createFormat } from "../../../shared/format.js";
import { benchmarkFormat } from "../../../src/features/benchmarks/format.js";

// Expected strings are the locale conventions of the Unicode CLDR as ECMA-402 Intl.NumberFormat applies them
// (en-US: "13.7%", "1,234"; de-DE: "13,7 %", "1.234").

const share = { value: 0.137, lower: 0.113, upper: 0.166, successes: 91, n: 663, note: null };

describe("benchmarkFormat(format)", () => {
  it("writes a share with its interval and counts in the reader's locale", () => {
    const en = benchmarkFormat(createFormat({ locale: "en-US", currency: "USD" }));
    expect(en.share(share)).toBe("13.7% (11.3%–16.6%)");
    expect(en.interval(share)).toBe("95\u00a0%: 11.3%–16.6% · 91 of 663");
    expect(en.count(1234)).toBe("1,234");
    expect(en.days(12.5)).toBe("12.5\u00a0d");
    const de = benchmarkFormat(createFormat({ locale: "de-DE", currency: "EUR" }));
    expect(de.pct(0.137)).toBe("13,7\u00a0%");
    expect(de.count(1234)).toBe("1.234");
  });

  it("writes a median's interval in days, or why there is none", () => {
    const en = benchmarkFormat(createFormat({ locale: "en-US", currency: "USD" }));
    expect(en.medianLimits({ from: 2, to: 9, coverage: 0.979 }, 10)).toBe("95\u00a0%: 2–9\u00a0d");
    expect(en.medianLimits(null, 4)).toBe("too few for an interval");
    expect(en.share({ ...share, value: null, note: "fewer than 30 lines" })).toBe("fewer than 30 lines");
  });
});
