import { describe, expect, it } from "vitest";
import { isDjf, monthOf } from "../../../etl/demo/calendar.js";
import { shops, WINDOW_START } from "../../../etl/demo/scenario.js";
import { AR_PHI, simulateWeather } from "../../../etl/demo/weather.js";

// A self-check of the generator against its own spec (SCENARIO.md "Shops & weather" table), not a check of
// any outside climate data.
describe("simulateWeather(seed, shop)", () => {
  it.each(shops.map((s) => [s.code, s] as const))("%s: DJF and July mean Tmin fall near the scenario table", (_, shop) => {
    const w = simulateWeather(3, shop);
    const djf: number[] = [];
    const jul: number[] = [];
    w.tminF.forEach((t, i) => {
      const day = w.firstDay + i;
      if (day < WINDOW_START) return;
      if (isDjf(day)) djf.push(t);
      if (monthOf(day) === 7) jul.push(t);
    });
    const mean = (xs: number[]): number => xs.reduce((a, b) => a + b, 0) / xs.length;
    // five winters of an AR(1) with φ = 0.7: the SD of a seasonal mean is about σ·√((1 + φ)/(1 − φ)/n)
    const tolerance = (n: number): number => 4 * shop.sigmaF * Math.sqrt((1 + AR_PHI) / (1 - AR_PHI) / n) + 1;
    expect(Math.abs(mean(djf) - shop.djfMeanTminF)).toBeLessThan(tolerance(djf.length));
    expect(Math.abs(mean(jul) - shop.julMeanTminF)).toBeLessThan(tolerance(jul.length) + 2);
  });

  it("keeps Tmax above Tmin and is the same for the same seed", () => {
    const a = simulateWeather(9, shops[0]!);
    const b = simulateWeather(9, shops[0]!);
    expect(a.tminF).toEqual(b.tminF);
    expect(a.tmaxF.every((t, i) => t > a.tminF[i]!)).toBe(true);
  });
});
