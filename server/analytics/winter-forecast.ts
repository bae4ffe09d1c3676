import { quantile } from "d3-array";
import { poissonQuantile } from "./distributions.js";

/**
 * Winter readiness maths: how many cold-start parts a shop's machines will need over a coming period, and how
 * many to hold so that a back-order does not leave a machine down. Pure functions of plain numbers.
 */

/**
 * Weibull cumulative hazard added between ages a and a + h: ΔH = ((a + h)/η)^β − (a/η)^β (engine hours; β unitless).
 */
export function weibullHazardIncrement(age: number, hours: number, shape: number, scale: number): number {
  if (!(age >= 0) || !(hours >= 0)) throw new RangeError(`age and hours must be 0 or more, got ${age} and ${hours}`);
  if (!(shape > 0) || !(scale > 0)) throw new RangeError(`shape and scale must be positive, got ${shape} and ${scale}`);
  return Math.pow((age + hours) / scale, shape) - Math.pow(age / scale, shape);
}

/**
 * Probability that a part aged `age` engine hours, still working, fails within its next `hours` engine hours:
 * p = 1 − S(a + h)/S(a) = 1 − exp(−k·ΔH), with ΔH from {@link weibullHazardIncrement} and k the cold factor
 * (1 = the temperature mix the fit came from). Computed with expm1 so small probabilities keep their digits.
 */
export function conditionalFailureProbability(age: number, hours: number, shape: number, scale: number, coldFactor = 1): number {
  if (!(coldFactor >= 0)) throw new RangeError(`cold factor must be 0 or more, got ${coldFactor}`);
  return -Math.expm1(-coldFactor * weibullHazardIncrement(age, hours, shape, scale));
}

/**
 * Cold factor k = Σ_b w_shop,b·RR_b ÷ Σ_b w_fit,b·RR_b: how much more (or less) hazard a shop's season carries
 * than the temperature mix the fit was made from. RR_b are failure-rate ratios per daily-minimum band; the
 * weights are shares of days per band (each set summing to 1). Bands without a measured ratio are left out of
 * both sums. Returns 1 when the fit's own weighted sum is 0 (nothing to scale against).
 */
export function coldFactor(rateRatios: readonly (number | null)[], shopShares: readonly number[], fitShares: readonly number[]): number {
  if (rateRatios.length !== shopShares.length || rateRatios.length !== fitShares.length) throw new RangeError("the bands, shop shares and fit shares must have the same length");
  let num = 0;
  let den = 0;
  let shopKept = 0;
  let fitKept = 0;
  rateRatios.forEach((rr, i) => {
    if (rr === null || !Number.isFinite(rr)) return;
    num += shopShares[i] * rr;
    den += fitShares[i] * rr;
    shopKept += shopShares[i];
    fitKept += fitShares[i];
  });
  if (!(den > 0) || !(shopKept > 0) || !(fitKept > 0)) return 1;
  // renormalise over the bands kept, so a band without a ratio neither adds nor removes hazard
  return num / shopKept / (den / fitKept);
}

/**
 * Distribution of the number of successes among independent trials with probabilities pᵢ (the Poisson-binomial
 * distribution), exactly, by the recursion P_j(k) = P_{j−1}(k)(1 − p_j) + P_{j−1}(k − 1)p_j. Returns P(X = k)
 * for k = 0 … n. O(n²) time; trials with p = 0 are skipped.
 */
export function poissonBinomialPmf(ps: readonly number[]): Float64Array {
  const kept = ps.filter((p) => {
    if (!(p >= 0 && p <= 1)) throw new RangeError(`each probability must be in [0, 1], got ${p}`);
    return p > 0;
  });
  const pmf = new Float64Array(kept.length + 1);
  pmf[0] = 1;
  kept.forEach((p, j) => {
    for (let k = j + 1; k >= 1; k--) pmf[k] = pmf[k] * (1 - p) + pmf[k - 1] * p;
    pmf[0] *= 1 - p;
  });
  return pmf;
}

/** The smallest k with P(X ≤ k) ≥ q for a pmf over 0 … n (a small tolerance absorbs rounding in the sums). */
export function pmfQuantile(pmf: ArrayLike<number>, q: number): number {
  if (!(q > 0 && q < 1)) throw new RangeError(`q must be in (0, 1), got ${q}`);
  let cum = 0;
  for (let k = 0; k < pmf.length; k++) {
    cum += pmf[k];
    if (cum >= q - 1e-12) return k;
  }
  return pmf.length - 1;
}

export interface CountForecast {
  /** Σ pᵢ */
  expected: number;
  /** the `lowerQ` and `upperQ` points of the Poisson-binomial count */
  lower: number;
  upper: number;
}

/**
 * Expected failures Σ pᵢ and a prediction interval for the count of independent parts failing with
 * probabilities pᵢ: the 5 % and 95 % points of the exact Poisson-binomial distribution by default (a 90 %
 * interval). The fitted parameters are taken as known: the interval leaves their uncertainty out.
 */
export function forecastCount(ps: readonly number[], lowerQ = 0.05, upperQ = 0.95): CountForecast {
  const pmf = poissonBinomialPmf(ps);
  return { expected: ps.reduce((s, p) => s + p, 0), lower: pmfQuantile(pmf, lowerQ), upper: pmfQuantile(pmf, upperQ) };
}

/**
 * Prior weight of the shop calibration, in expected failures: the ratio is pulled towards 1 as if the shop had
 * also shown exactly its expected count over this many expected failures.
 */
export const CALIBRATION_PRIOR = 10;

/**
 * Gamma–Poisson credibility estimate of a relative risk (Clayton & Kaldor 1987, Biometrics 43:671, "Empirical
 * Bayes estimates of age-standardized relative risks"): with O observed and E expected failures and a gamma prior
 * of mean 1 and shape = rate = a, the posterior mean of the ratio is (O + a) ÷ (E + a). A shop with few expected
 * failures stays near 1; one with many moves towards O ÷ E.
 */
export function credibilityRatio(observed: number, expected: number, prior = CALIBRATION_PRIOR): number {
  if (!(observed >= 0) || !(expected >= 0)) throw new RangeError(`observed and expected must be 0 or more, got ${observed} and ${expected}`);
  if (!(prior > 0)) throw new RangeError(`the prior weight must be positive, got ${prior}`);
  return (observed + prior) / (expected + prior);
}

/** A failure probability with its cumulative hazard multiplied by `ratio`: 1 − (1 − p)^ratio. */
export function calibratedProbability(p: number, ratio: number): number {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`p must be in [0, 1], got ${p}`);
  if (!(ratio >= 0)) throw new RangeError(`ratio must be 0 or more, got ${ratio}`);
  if (p === 1) return ratio > 0 ? 1 : 0;
  return -Math.expm1(ratio * Math.log1p(-p));
}

/**
 * Negative binomial pmf by mean and shape r (the gamma–Poisson mixture: a Poisson count whose mean is
 * `mean`·θ, θ ~ Gamma(shape r, rate r)): P(k) = C(k + r − 1, k)·q^r·(1 − q)^k with q = r ÷ (r + mean), for
 * k = 0 … maxK (default: far enough into the tail that the rest is below 1e-12).
 */
export function negativeBinomialPmf(shape: number, mean: number, maxK?: number): Float64Array {
  if (!(shape > 0)) throw new RangeError(`shape must be positive, got ${shape}`);
  if (!(mean >= 0)) throw new RangeError(`mean must be 0 or more, got ${mean}`);
  const q = shape / (shape + mean);
  const sd = Math.sqrt(mean + (mean * mean) / shape);
  const n = maxK ?? Math.ceil(mean + 12 * sd + 10);
  const pmf = new Float64Array(n + 1);
  pmf[0] = Math.exp(shape * Math.log(q));
  for (let k = 1; k <= n; k++) pmf[k] = (pmf[k - 1] * (k - 1 + shape) * (1 - q)) / k;
  return pmf;
}

/** The pmf of the sum of two independent counts. */
export function convolvePmf(a: ArrayLike<number>, b: ArrayLike<number>): Float64Array {
  const out = new Float64Array(a.length + b.length - 1);
  for (let i = 0; i < a.length; i++) {
    if (a[i] === 0) continue;
    for (let j = 0; j < b.length; j++) out[i + j] += a[i] * b[j];
  }
  return out;
}

export interface CalibratedCell {
  /** Σ of the calibrated probabilities */
  expected: number;
  /** shape of the ratio's gamma posterior: past observed failures + the prior weight */
  shape: number;
}

/**
 * Expected count and interval for independent groups (shop × component cells) whose count is each a gamma–Poisson
 * mixture: negative binomial with the cell's expected count and its posterior shape O + a. The interval is the
 * 5 % and 95 % points of the sum, by convolution; it carries the uncertainty of each cell's calibration ratio.
 */
export function calibratedCount(cells: readonly CalibratedCell[], lowerQ = 0.05, upperQ = 0.95): CountForecast {
  let pmf: Float64Array = Float64Array.of(1);
  for (const c of cells) if (c.expected > 0) pmf = convolvePmf(pmf, negativeBinomialPmf(c.shape, c.expected));
  return { expected: cells.reduce((s, c) => s + c.expected, 0), lower: pmfQuantile(pmf, lowerQ), upper: pmfQuantile(pmf, upperQ) };
}

/**
 * Quantity to hold: the smallest q with P(D ≤ q) ≥ service level for demand D ~ Poisson(mean) over the lead time
 * (R's qpois). A mean of 0 needs none.
 */
export function stockToHold(meanDemand: number, serviceLevel: number): number {
  if (!(serviceLevel > 0 && serviceLevel < 1)) throw new RangeError(`service level must be in (0, 1), got ${serviceLevel}`);
  if (!(meanDemand >= 0)) throw new RangeError(`mean demand must be 0 or more, got ${meanDemand}`);
  return poissonQuantile(serviceLevel, meanDemand);
}

export interface LeadTime {
  lines: number;
  median: number | null;
  p90: number | null;
}

/** Median and 90th percentile of order → receipt days (R type 7 quantiles, d3-array); nulls with no lines. */
export function leadTimeSummary(days: readonly number[]): LeadTime {
  const xs = days.filter((d) => Number.isFinite(d) && d >= 0).sort((a, b) => a - b);
  return { lines: xs.length, median: quantile(xs, 0.5) ?? null, p90: quantile(xs, 0.9) ?? null };
}

const DAY = 86_400_000;
const iso = (t: number) => new Date(t).toISOString().slice(0, 10);

/** An ISO date moved by whole days (UTC calendar). */
export function addDays(date: string, days: number): string {
  return iso(Date.parse(`${date}T00:00:00Z`) + Math.round(days) * DAY);
}

/** Calendar days from `from` to `to`, both included. */
export function daysInclusive(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / DAY) + 1;
}

/**
 * The winter ahead of the last day with data: when the data ends inside a winter (1 November – 30 March), the
 * rest of that winter, from the next day to 31 March (what a shop can still act on); otherwise the next
 * 1 November → 31 March.
 */
export function nextSeason(dataEnd: string): { from: string; to: string } {
  const y = Number(dataEnd.slice(0, 4));
  const md = dataEnd.slice(5);
  if (md >= "11-01") return { from: addDays(dataEnd, 1), to: `${y + 1}-03-31` };
  if (md < "03-31") return { from: addDays(dataEnd, 1), to: `${y}-03-31` };
  return { from: `${y}-11-01`, to: `${y + 1}-03-31` };
}

/** The last complete 1 November → 31 March season that ends on or before `dataEnd`. */
export function lastCompleteSeason(dataEnd: string): { from: string; to: string } {
  const y = Number(dataEnd.slice(0, 4));
  const end = dataEnd >= `${y}-03-31` ? y : y - 1;
  return { from: `${end - 1}-11-01`, to: `${end}-03-31` };
}

/** Order-by date = period start − planning lead time (days, rounded up); "order now" when it is on or before today. */
export function orderBy(periodStart: string, leadTimeDays: number, today: string): { date: string; now: boolean } {
  const date = addDays(periodStart, -Math.ceil(leadTimeDays));
  return { date, now: date <= today };
}
