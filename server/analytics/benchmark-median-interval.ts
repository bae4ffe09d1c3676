/**
 * A distribution-free confidence interval for a median from the order statistics (W. J. Conover, Practical
 * Nonparametric Statistics, 3rd ed., Wiley 1999, §3.2). With x₍₁₎ ≤ … ≤ x₍ₙ₎ sorted, [x₍ₖ₎, x₍ₙ₋ₖ₊₁₎] covers
 * the population median with probability P(k ≤ B ≤ n − k), B ~ Binomial(n, ½), for any continuous distribution.
 * The interval is the narrowest of that form whose coverage is at least the level asked for; its actual
 * coverage is returned with it (the binomial is discrete, so it is usually above the level).
 */
import jStat from "jstat";

/** Coverage of [x₍ₖ₎, x₍ₙ₋ₖ₊₁₎]: P(k ≤ B ≤ n − k) = 1 − 2·P(B ≤ k − 1), B ~ Bin(n, ½). */
export function medianCoverage(n: number, k: number): number {
  return 1 - 2 * jStat.binomial.cdf(k - 1, n, 0.5);
}

export interface MedianRanks {
  /** 1-based ranks of the lower and upper limits: k and n − k + 1 */
  lower: number;
  upper: number;
  /** P(k ≤ B ≤ n − k) */
  coverage: number;
}

/** The largest k with coverage ≥ level, or null when even [x₍₁₎, x₍ₙ₎] falls short (n ≤ 5 at 95 %). */
export function medianRanks(n: number, level = 0.95): MedianRanks | null {
  if (!Number.isInteger(n) || n < 1 || medianCoverage(n, 1) < level) return null;
  let k = 1;
  while (k + 1 <= Math.floor((n + 1) / 2) && medianCoverage(n, k + 1) >= level) k++;
  return { lower: k, upper: n - k + 1, coverage: medianCoverage(n, k) };
}

/** The limits of the interval: the values at ranks k and n − k + 1, with those ranks and the coverage. */
export interface MedianLimits extends MedianRanks {
  from: number;
  to: number;
}

/**
 * The sample median (the middle value, or the mean of the two middle values) of the finite values, with its
 * distribution-free interval at `level` (null when n is too small for it); null when there are no values.
 */
export function medianInterval(values: readonly number[], level = 0.95): { n: number; median: number; interval: MedianLimits | null } | null {
  const xs = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  const n = xs.length;
  if (n === 0) return null;
  const median = n % 2 ? xs[(n - 1) / 2]! : (xs[n / 2 - 1]! + xs[n / 2]!) / 2;
  const ranks = medianRanks(n, level);
  return { n, median, interval: ranks && { ...ranks, from: xs[ranks.lower - 1]!, to: xs[ranks.upper - 1]! } };
}
