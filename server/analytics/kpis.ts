/**
 * Shop KPIs besides the comeback rate (DOMAIN.md §3 "Shop KPIs", common practice, no source). Pure: sums and
 * samples in, figures out. Proportions get a Wilson interval from ./proportion.ts.
 */
import { quantile } from "d3-array";
import { wilsonInterval, type ProportionEstimate } from "./proportion.js";

export interface LabourEfficiency {
  /** lines that have a standard (flat-rate) time and a recorded actual time */
  lines: number;
  standardHours: number;
  actualHours: number;
  /** Σ standard h ÷ Σ actual h; above 1 beats the standard. Null when no actual time was booked. */
  ratio: number | null;
}

/**
 * Labour efficiency = Σ standard (flat-rate) hours ÷ Σ actual hours, over the lines that have a standard.
 * Unitless; 1.10 means the work took 10 % less time than the standard allows.
 */
export function labourEfficiency(lines: number, standardHours: number, actualHours: number): LabourEfficiency {
  return { lines, standardHours, actualHours, ratio: actualHours > 0 ? standardHours / actualHours : null };
}

/** Adds two efficiency sums (e.g. months into a quarter). */
export function addEfficiency(a: LabourEfficiency, b: LabourEfficiency): LabourEfficiency {
  return labourEfficiency(a.lines + b.lines, a.standardHours + b.standardHours, a.actualHours + b.actualHours);
}

export interface WaitSummary {
  /** part lines with both an order and a receipt date */
  n: number;
  /** calendar days from order to receipt */
  median: number | null;
  p90: number | null;
}

/**
 * Parts wait: median and 90th percentile of the days from part order to receipt. Quantiles by d3-array
 * (linear interpolation between order statistics, R type 7: h = (n − 1)·p, x_⌊h⌋ + (h − ⌊h⌋)(x_⌊h⌋+1 − x_⌊h⌋)).
 * Takes a histogram (days → lines) so SQL can group the waits.
 */
export function partsWait(histogram: ReadonlyMap<number, number> | readonly (readonly [number, number])[]): WaitSummary {
  const entries = [...histogram].filter(([, count]) => count > 0).sort((a, b) => a[0] - b[0]);
  const values: number[] = [];
  for (const [days, count] of entries) for (let i = 0; i < count; i++) values.push(days);
  if (values.length === 0) return { n: 0, median: null, p90: null };
  return { n: values.length, median: quantile(values, 0.5)!, p90: quantile(values, 0.9)! };
}

/** A share (successes of n) with its 95 % Wilson interval; the interval is null when n = 0. */
export interface Share {
  successes: number;
  n: number;
  estimate: ProportionEstimate | null;
}

/**
 * A share with a 95 % Wilson interval: back-ordered part lines ÷ part lines, cold-start jobs with a diagnostic
 * measurement recorded ÷ cold-start jobs, claims filed on or before the deadline ÷ claims.
 */
export function share(successes: number, n: number): Share {
  return { successes, n, estimate: wilsonInterval(successes, n) };
}
