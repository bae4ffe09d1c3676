import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { Rng } from "../../../etl/demo/prng.js";
import { processes } from "../../../etl/demo/scenario.js";

const gamma = (x: number): number => (jStat as unknown as { gammafn(x: number): number }).gammafn(x);

describe("Rng.weibull(beta, eta)", () => {
  // Closed forms from the NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.6.8 (Weibull
  // distribution): mean = η·Γ(1 + 1/β), median = η·(ln 2)^(1/β), variance = η²·[Γ(1 + 2/β) − Γ(1 + 1/β)²].
  const cases = [...new Map(processes.map((p) => [`${p.beta}/${p.eta}`, p])).values()].map((p) => [p.code, p.beta, p.eta] as const);
  cases.push(["BT-2109 heater plugs", 1.8, 4000]);

  it.each(cases)("%s (β %d, η %d h) recovers the closed-form mean and median", (_, beta, eta) => {
    const rng = new Rng(Math.round(beta * 1000 + eta));
    const n = 40_000;
    const xs = Array.from({ length: n }, () => rng.weibull(beta, eta)).sort((a, b) => a - b);
    const mean = xs.reduce((a, b) => a + b, 0) / n;
    const expectedMean = eta * gamma(1 + 1 / beta);
    const sd = eta * Math.sqrt(gamma(1 + 2 / beta) - gamma(1 + 1 / beta) ** 2);
    expect(Math.abs(mean - expectedMean)).toBeLessThan((4 * sd) / Math.sqrt(n));
    expect(xs[n / 2]! / (eta * Math.log(2) ** (1 / beta))).toBeCloseTo(1, 1);
  });
});
