import jStat from "jstat";
import { binomialPmf } from "./distributions.js";

/**
 * Two Poisson rates compared by the exact conditional test (Przyborowski & Wilenski 1940), as R's
 * `poisson.test(c(x1, x2), c(t1, t2))` does it: given the total n = x1 + x2, x1 is Bin(n, p) under
 * H0: λ1/λ2 = r with p = r·t1/(r·t1 + t2). The two-sided p-value and the interval are `binom.test`'s, and the
 * interval for p maps to the rate ratio by ratio = p/(1 − p) · t2/t1.
 */

/** R's relative tolerance in binom.test: outcomes whose probability is within 1 + 1e-7 of the observed one count as "as extreme". */
const RELATIVE_ERROR = 1 + 1e-7;

function assertCount(name: string, x: number): void {
  if (!Number.isInteger(x) || x < 0) throw new RangeError(`${name} must be a non-negative integer, got ${x}`);
}

/** P(X ≤ k) for X ~ Bin(n, p), by summing the log-space pmf (exact to rounding for the n of a fleet). */
function binomialCdf(k: number, n: number, p: number): number {
  let sum = 0;
  for (let i = 0; i <= Math.min(k, n); i++) sum += binomialPmf(i, n, p);
  return Math.min(1, sum);
}

/** P(X > k) for X ~ Bin(n, p), summed from the upper tail so small tails keep their digits. */
function binomialUpper(k: number, n: number, p: number): number {
  let sum = 0;
  for (let i = Math.max(k + 1, 0); i <= n; i++) sum += binomialPmf(i, n, p);
  return Math.min(1, sum);
}

/**
 * Two-sided exact binomial p-value by R's `binom.test` rule: the probability of every outcome no more likely
 * than the observed x (within a relative tolerance of 1 + 1e-7). On the side of x the whole tail P(X ≤ x)
 * (or P(X ≥ x)) is taken; on the other side, the y outcomes from the mode outward with pmf ≤ pmf(x)·(1 + 1e-7).
 * Returns 1 when x equals the expected count n·p.
 */
export function binomialTwoSidedPValue(x: number, n: number, p: number): number {
  assertCount("x", x);
  assertCount("n", n);
  if (x > n) throw new RangeError(`x (${x}) cannot exceed n (${n})`);
  if (!(p >= 0 && p <= 1)) throw new RangeError(`p must be in [0, 1], got ${p}`);
  if (p === 0) return x === 0 ? 1 : 0;
  if (p === 1) return x === n ? 1 : 0;
  const d = binomialPmf(x, n, p) * RELATIVE_ERROR;
  const m = n * p;
  if (x === m) return 1;
  if (x < m) {
    let y = 0;
    for (let i = Math.ceil(m); i <= n; i++) if (binomialPmf(i, n, p) <= d) y++;
    return Math.min(1, binomialCdf(x, n, p) + binomialUpper(n - y, n, p));
  }
  let y = 0;
  for (let i = 0; i <= Math.floor(m); i++) if (binomialPmf(i, n, p) <= d) y++;
  return Math.min(1, binomialCdf(y - 1, n, p) + binomialUpper(x - 1, n, p));
}

/**
 * Clopper–Pearson exact interval for a binomial proportion x/n, as binom.test gives it:
 * lower = Beta⁻¹(α/2; x, n − x + 1) (0 when x = 0), upper = Beta⁻¹(1 − α/2; x + 1, n − x) (1 when x = n).
 */
export function clopperPearsonInterval(x: number, n: number, level = 0.95): { lower: number; upper: number; level: number } {
  assertCount("x", x);
  assertCount("n", n);
  if (n === 0 || x > n) throw new RangeError(`need 0 ≤ x ≤ n and n > 0, got x = ${x}, n = ${n}`);
  const alpha = 1 - level;
  const lower = x === 0 ? 0 : jStat.beta.inv(alpha / 2, x, n - x + 1);
  const upper = x === n ? 1 : jStat.beta.inv(1 - alpha / 2, x + 1, n - x);
  return { lower, upper, level };
}

export interface RateComparison {
  eventsA: number;
  exposureA: number;
  eventsB: number;
  exposureB: number;
  per: number;
  /** per × events ÷ exposure for each group */
  rateA: number;
  rateB: number;
  /** (eventsA/exposureA) ÷ (eventsB/exposureB); null when group B has no events (the ratio is unbounded). */
  ratio: number | null;
  /** Exact interval of the ratio; a null upper limit means unbounded. */
  lower: number;
  upper: number | null;
  level: number;
  /** Two-sided exact conditional p-value for H0: ratio = `nullRatio`. */
  pValue: number;
  /** Expected events in group A under H0: n·r·tA/(r·tA + tB) (R's "expected count1"). */
  expectedA: number;
  nullRatio: number;
}

export interface RateComparisonOptions {
  per?: number;
  level?: number;
  /** the rate ratio under H0; default 1 */
  nullRatio?: number;
}

/**
 * Compares the event rates of two groups with exposures (engine hours, machine-days). Returns null when either
 * exposure is not positive or there are no events at all (no information about the ratio, as binom.test
 * refuses n = 0). Exposure is treated as known without error. See the module note for the method.
 */
export function compareRates(
  eventsA: number,
  exposureA: number,
  eventsB: number,
  exposureB: number,
  options: RateComparisonOptions = {},
): RateComparison | null {
  assertCount("eventsA", eventsA);
  assertCount("eventsB", eventsB);
  const per = options.per ?? 1000;
  const level = options.level ?? 0.95;
  const r = options.nullRatio ?? 1;
  if (!(exposureA > 0) || !(exposureB > 0)) return null;
  const n = eventsA + eventsB;
  if (n === 0) return null;
  const p0 = (r * exposureA) / (r * exposureA + exposureB);
  const ci = clopperPearsonInterval(eventsA, n, level);
  const toRatio = (p: number) => (p / (1 - p)) * (exposureB / exposureA);
  return {
    eventsA,
    exposureA,
    eventsB,
    exposureB,
    per,
    rateA: (per * eventsA) / exposureA,
    rateB: (per * eventsB) / exposureB,
    ratio: eventsB === 0 ? null : eventsA / exposureA / (eventsB / exposureB),
    lower: toRatio(ci.lower),
    upper: ci.upper >= 1 ? null : toRatio(ci.upper),
    level,
    pValue: binomialTwoSidedPValue(eventsA, n, p0),
    expectedA: n * p0,
    nullRatio: r,
  };
}
