import { binomialPmf, normalQuantile, twoSidedZ } from "./distributions.js";

/** A proportion with a two-sided interval. */
export interface ProportionEstimate {
  successes: number;
  n: number;
  proportion: number;
  lower: number;
  upper: number;
  level: number;
}

/** Lower and upper funnel limits, both as proportions in [0, 1]. */
export interface FunnelBand {
  lower: number;
  upper: number;
}

/** Funnel limits for one denominator: 95 % ("2σ") and 99.8 % ("3σ"), by both methods. */
export interface FunnelLimits {
  n: number;
  target: number;
  normal95: FunnelBand;
  normal998: FunnelBand;
  exact95: FunnelBand;
  exact998: FunnelBand;
}

function assertProportionInput(successes: number, n: number): void {
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`n must be a non-negative integer, got ${n}`);
  if (!Number.isInteger(successes) || successes < 0 || successes > n) {
    throw new RangeError(`successes must be an integer in [0, n], got ${successes}`);
  }
}

const clamp01 = (x: number): number => Math.min(1, Math.max(0, x));

/**
 * Wilson score interval for a binomial proportion, without continuity correction (Newcombe 1998, method 3):
 *
 *   [p̂ + z²/2n ± z·√(p̂(1 − p̂)/n + z²/4n²)] / (1 + z²/n),  p̂ = x/n, z = Φ⁻¹(1 − α/2).
 *
 * Unitless (a proportion of lines, complaints, claims). Returns null for n = 0 (no proportion exists).
 */
export function wilsonInterval(successes: number, n: number, level = 0.95): ProportionEstimate | null {
  assertProportionInput(successes, n);
  if (n === 0) return null;
  const z = twoSidedZ(level);
  const p = successes / n;
  const z2 = z * z;
  const centre = p + z2 / (2 * n);
  const half = z * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  const denominator = 1 + z2 / n;
  return {
    successes,
    n,
    proportion: p,
    lower: clamp01((centre - half) / denominator),
    upper: clamp01((centre + half) / denominator),
    level,
  };
}

/**
 * Normal-approximation funnel limit around a target proportion p0 at denominator n (Spiegelhalter 2005):
 * p0 + z_q·√(p0(1 − p0)/n) with z_q = Φ⁻¹(q), truncated to [0, 1]. q = 0.025/0.975 gives the 95 % funnel,
 * q = 0.001/0.999 the 99.8 % funnel.
 */
export function funnelLimitNormal(target: number, n: number, q: number): number {
  return clamp01(target + normalQuantile(q) * Math.sqrt((target * (1 - target)) / n));
}

/**
 * Exact binomial funnel limit with interpolation (Spiegelhalter 2005, appendix on proportions), for R ~ Bin(n, p0):
 *   r_q = smallest r with P(R ≤ r) ≥ q;  α = (P(R ≤ r_q) − q) / P(R = r_q);  limit = (r_q − α)/n, truncated to [0, 1].
 * The interpolation makes the limit a smooth function of n instead of a staircase.
 */
export function funnelLimitExact(target: number, n: number, q: number): number {
  let cdf = 0;
  for (let r = 0; r <= n; r++) {
    const pmf = binomialPmf(r, n, target);
    cdf += pmf;
    if (cdf >= q || r === n) return clamp01((r - (cdf - q) / pmf) / n);
  }
  return 1;
}

/**
 * Funnel-plot control limits for a proportion (e.g. a shop's comeback rate) against a target p0 at denominator n:
 * 95 % (q = 0.025, 0.975) and 99.8 % (q = 0.001, 0.999) limits by the normal approximation and by the
 * interpolated exact binomial. A shop is "outside" a funnel when its observed proportion x/n falls beyond it.
 */
export function funnelLimits(target: number, n: number): FunnelLimits {
  if (!(target > 0 && target < 1)) throw new RangeError(`target must be in (0, 1), got ${target}`);
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`n must be a positive integer, got ${n}`);
  const band = (f: (t: number, m: number, q: number) => number, q: number): FunnelBand => ({
    lower: f(target, n, q),
    upper: f(target, n, 1 - q),
  });
  return {
    n,
    target,
    normal95: band(funnelLimitNormal, 0.025),
    normal998: band(funnelLimitNormal, 0.001),
    exact95: band(funnelLimitExact, 0.025),
    exact998: band(funnelLimitExact, 0.001),
  };
}

/** A shop's proportion benchmarked against the group rate. */
export interface ProportionBenchmark {
  estimate: ProportionEstimate | null;
  groupRate: number;
  /** n below the minimum: no interval shown and never flagged. */
  suppressed: boolean;
  /** The Wilson lower limit is above the group rate. */
  flagged: boolean;
}

/**
 * Benchmarks a shop's proportion (e.g. comeback rate) against the group rate: 95 % Wilson interval, flagged
 * only when the lower limit exceeds the group rate, suppressed when n < `minimumN` (default 30, DOMAIN.md [C]).
 * Flags only shops that are worse than the group (a high proportion); low proportions are never flagged.
 */
export function benchmarkProportion(
  successes: number,
  n: number,
  groupRate: number,
  minimumN = 30,
  level = 0.95,
): ProportionBenchmark {
  const suppressed = n < minimumN;
  const estimate = suppressed ? null : wilsonInterval(successes, n, level);
  return { estimate, groupRate, suppressed, flagged: estimate !== null && estimate.lower > groupRate };
}
