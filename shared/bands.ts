/**
 * Exposure bands shared by the warehouse aggregates, the analytics routes and the charts.
 *
 * Hour bands (engine hours on the meter): 0–500, 500–1k, 1k–2k, 2k–3k, 3k–4k, 4k–6k, ≥6k h.
 * Temperature bands (daily minimum): <0, 0–20, 20–32, 32–45, ≥45 °F, stored in °C as
 * (°F − 32) × 5/9, i.e. edges −17.78, −6.67, 0 and 7.22 °C.
 */
export interface Band {
  id: string;
  /** inclusive lower edge; null = open below */
  lo: number | null;
  /** exclusive upper edge; null = open above */
  hi: number | null;
}

export const hourBands: readonly Band[] = [
  { id: "0-500", lo: 0, hi: 500 },
  { id: "500-1k", lo: 500, hi: 1000 },
  { id: "1k-2k", lo: 1000, hi: 2000 },
  { id: "2k-3k", lo: 2000, hi: 3000 },
  { id: "3k-4k", lo: 3000, hi: 4000 },
  { id: "4k-6k", lo: 4000, hi: 6000 },
  { id: "6k+", lo: 6000, hi: null },
];

export const fahrenheitToCelsius = (f: number): number => ((f - 32) * 5) / 9;
export const celsiusToFahrenheit = (c: number): number => (c * 9) / 5 + 32;

const tempEdgesF = [0, 20, 32, 45] as const;

export const temperatureBands: readonly (Band & { loF: number | null; hiF: number | null })[] = [
  { id: "below-0F", lo: null, hi: fahrenheitToCelsius(0), loF: null, hiF: 0 },
  { id: "0-20F", lo: fahrenheitToCelsius(0), hi: fahrenheitToCelsius(20), loF: 0, hiF: 20 },
  { id: "20-32F", lo: fahrenheitToCelsius(20), hi: fahrenheitToCelsius(32), loF: 20, hiF: 32 },
  { id: "32-45F", lo: fahrenheitToCelsius(32), hi: fahrenheitToCelsius(45), loF: 32, hiF: 45 },
  { id: "45F-up", lo: fahrenheitToCelsius(45), hi: null, loF: 45, hiF: null },
];
export const temperatureEdgesF = tempEdgesF;

/** The band a value falls in (lo inclusive, hi exclusive). */
export function bandOf(bands: readonly Band[], value: number): Band {
  const b = bands.find((x) => (x.lo === null || value >= x.lo) && (x.hi === null || value < x.hi));
  if (!b) throw new Error(`value ${value} falls in no band`);
  return b;
}

/** A label in the user's unit: "0–20 °F" or "−17.8 – −6.7 °C". */
export function temperatureBandLabel(id: string, unit: "C" | "F"): string {
  const b = temperatureBands.find((x) => x.id === id);
  if (!b) return id;
  const lo = unit === "F" ? b.loF : b.lo;
  const hi = unit === "F" ? b.hiF : b.hi;
  const f = (v: number) => (unit === "F" ? String(v) : v.toFixed(1)).replace("-", "−");
  if (lo === null) return `below ${f(hi!)} °${unit}`;
  if (hi === null) return `${f(lo)} °${unit} and above`;
  return `${f(lo)} to ${f(hi)} °${unit}`;
}

export function hourBandLabel(id: string): string {
  const b = hourBands.find((x) => x.id === id);
  if (!b) return id;
  return b.hi === null ? `${b.lo!.toLocaleString("en-US")} h and over` : `${b.lo!.toLocaleString("en-US")}–${b.hi.toLocaleString("en-US")} h`;
}
