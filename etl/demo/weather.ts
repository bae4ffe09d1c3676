/**
 * Daily weather per shop (SCENARIO.md "Shops & weather"):
 *   Tmin(d) = M − A·cos(2π(doy − 20)/365.25) + ε,  M = (DJF + Jul)/2,  A = (Jul − DJF)/1.8,
 * ε an AR(1) with φ = 0.7 whose stationary SD is σ (innovations σ·√(1 − φ²)).
 * Tmax = Tmin + a diurnal range (the generator's own: the shop's mean range with 25% noise, at least 3 °F).
 */
import { dayOfYear } from "./calendar.js";
import { stream } from "./prng.js";
import { WEATHER_BURN_IN_DAYS, WEATHER_START, WINDOW_END, type ShopDef } from "./scenario.js";

export const AR_PHI = 0.7;

export interface ShopWeather {
  shop: string;
  /** first simulated day (epoch day) */
  firstDay: number;
  tminF: Float64Array;
  tmaxF: Float64Array;
}

export function seasonalMeanTminF(shop: ShopDef, day: number): number {
  const m = (shop.djfMeanTminF + shop.julMeanTminF) / 2;
  const a = (shop.julMeanTminF - shop.djfMeanTminF) / 1.8;
  return m - a * Math.cos((2 * Math.PI * (dayOfYear(day) - 20)) / 365.25);
}

export function simulateWeather(seed: number, shop: ShopDef, firstDay = WEATHER_START, lastDay = WINDOW_END): ShopWeather {
  const rng = stream(seed, "weather", Number(shop.code.slice(1)));
  const n = lastDay - firstDay + 1;
  const tminF = new Float64Array(n);
  const tmaxF = new Float64Array(n);
  const innovationSd = shop.sigmaF * Math.sqrt(1 - AR_PHI * AR_PHI);
  let eps = rng.normal(0, shop.sigmaF);
  for (let i = 0; i < WEATHER_BURN_IN_DAYS; i++) eps = AR_PHI * eps + rng.normal(0, innovationSd);
  for (let i = 0; i < n; i++) {
    eps = AR_PHI * eps + rng.normal(0, innovationSd);
    const tmin = seasonalMeanTminF(shop, firstDay + i) + eps;
    tminF[i] = tmin;
    tmaxF[i] = tmin + Math.max(3, shop.diurnalRangeF * (1 + 0.25 * rng.normal()));
  }
  return { shop: shop.code, firstDay, tminF, tmaxF };
}

export function tminAt(w: ShopWeather, day: number): number {
  return w.tminF[day - w.firstDay]!;
}

export const fToC = (f: number): number => ((f - 32) * 5) / 9;
export const cToF = (c: number): number => (c * 9) / 5 + 32;
