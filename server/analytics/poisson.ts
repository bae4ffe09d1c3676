import { chiSquareQuantile, poissonUpperTail } from "./distributions.js";

/** A two-sided interval; `level` is its confidence level (0.95 = 95 %). */
export interface Interval {
  lower: number;
  upper: number;
  level: number;
}

/** A rate with its exact interval; all three numbers are "events per `per` units of exposure". */
export interface RateEstimate {
  events: number;
  exposure: number;
  per: number;
  rate: number;
  lower: number;
  upper: number;
  level: number;
}

/** Observed ÷ expected with exact limits on the ratio. */
export interface StandardisedRatio {
  observed: number;
  expected: number;
  ratio: number;
  lower: number;
  upper: number;
  level: number;
}

function assertCount(count: number): void {
  if (!Number.isInteger(count) || count < 0) throw new RangeError(`count must be a non-negative integer, got ${count}`);
}

/**
 * Exact (Garwood 1936) central confidence limits for a Poisson mean, given an observed count x.
 *
 * lower = χ²(α/2; 2x) / 2 (0 when x = 0), upper = χ²(1 − α/2; 2x + 2) / 2, with α = 1 − level.
 * Units: events. The interval is central (α/2 in each tail), so it is conservative, never approximate.
 */
export function poissonExactInterval(count: number, level = 0.95): Interval {
  assertCount(count);
  const alpha = 1 - level;
  const lower = count === 0 ? 0 : chiSquareQuantile(alpha / 2, 2 * count) / 2;
  const upper = chiSquareQuantile(1 - alpha / 2, 2 * count + 2) / 2;
  return { lower, upper, level };
}

/**
 * Event rate per `per` units of exposure with exact Garwood limits: rate = per × events ÷ exposure, and the
 * limits are the count limits of {@link poissonExactInterval} scaled the same way.
 *
 * Exposure is in whatever unit the caller counts (engine hours, machine-days); `per` = 1000 gives "per 1,000
 * engine hours" or "per 1,000 machine-days". Returns null when exposure is not positive (no rate exists).
 * Exposure is treated as known without error.
 */
export function poissonRate(events: number, exposure: number, per = 1000, level = 0.95): RateEstimate | null {
  assertCount(events);
  if (!(exposure > 0)) return null;
  const { lower, upper } = poissonExactInterval(events, level);
  const k = per / exposure;
  return { events, exposure, per, rate: events * k, lower: lower * k, upper: upper * k, level };
}

/**
 * Standardised ratio O/E (e.g. a standardised failure ratio after indirect standardisation) with exact limits:
 * the Garwood limits of O divided by E. E is treated as a fixed, error-free expected count.
 * Returns null when E is not positive.
 */
export function standardisedRatio(observed: number, expected: number, level = 0.95): StandardisedRatio | null {
  assertCount(observed);
  if (!(expected > 0)) return null;
  const { lower, upper } = poissonExactInterval(observed, level);
  return { observed, expected, ratio: observed / expected, lower: lower / expected, upper: upper / expected, level };
}

/**
 * One-sided exact Poisson p-value for an excess: P(X ≥ observed | X ~ Poisson(expected)).
 * Computed as the regularised lower incomplete gamma P(observed, expected), accurate for very small p.
 * Returns 1 when observed = 0. Tests for an excess only (a deficit is never significant here).
 */
export function poissonExcessPValue(observed: number, expected: number): number {
  assertCount(observed);
  if (expected < 0 || Number.isNaN(expected)) throw new RangeError(`expected must be ≥ 0, got ${expected}`);
  return poissonUpperTail(observed, expected);
}
