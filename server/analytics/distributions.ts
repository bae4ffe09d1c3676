import jStat from "jstat";

/**
 * Thin, typed access to the jStat distribution functions the analytics modules use. Everything here is a
 * direct call into jStat 1.9.6 except where a note says how the call is arranged for accuracy in the tails.
 */

/** Standard normal quantile Φ⁻¹(p), p in (0, 1). */
export function normalQuantile(p: number): number {
  return jStat.normal.inv(p, 0, 1);
}

/** Two-sided critical value z with P(|Z| ≤ z) = level, e.g. 1.959964 for 0.95 (not the rounded 1.96). */
export function twoSidedZ(level: number): number {
  return normalQuantile(1 - (1 - level) / 2);
}

/** Chi-square quantile: the x with P(χ²_df ≤ x) = p. */
export function chiSquareQuantile(p: number, df: number): number {
  return jStat.chisquare.inv(p, df);
}

/**
 * Chi-square upper tail P(χ²_df ≥ x), as 1 − CDF. Absolute accuracy is about 1e-15, so p-values below that are
 * returned as 0 (jStat has no accurate far-tail complement); show them as "< 1e-15".
 */
export function chiSquareUpperTail(x: number, df: number): number {
  if (x <= 0) return 1;
  return Math.max(0, 1 - jStat.chisquare.cdf(x, df));
}

/**
 * Poisson upper tail P(X ≥ k | mean μ) for integer k ≥ 0, via the identity P(X ≥ k) = P(k, μ), the regularised
 * lower incomplete gamma function (so it is accurate for tiny tails). Returns 1 for k = 0 and 0 for μ = 0, k > 0.
 */
export function poissonUpperTail(k: number, mean: number): number {
  if (k <= 0) return 1;
  if (mean <= 0) return 0;
  return Math.min(1, jStat.lowRegGamma(k, mean));
}

/**
 * Binomial probability P(R = r) for R ~ Bin(n, p), evaluated in log space with jStat's ln Γ so that large n
 * neither overflows the binomial coefficient nor underflows the powers.
 */
export function binomialPmf(r: number, n: number, p: number): number {
  if (r < 0 || r > n || !Number.isInteger(r)) return 0;
  if (p <= 0) return r === 0 ? 1 : 0;
  if (p >= 1) return r === n ? 1 : 0;
  const logPmf =
    jStat.gammaln(n + 1) - jStat.gammaln(r + 1) - jStat.gammaln(n - r + 1) + r * Math.log(p) + (n - r) * Math.log1p(-p);
  return Math.exp(logPmf);
}

/**
 * Poisson quantile: the smallest integer x with P(X ≤ x | mean μ) ≥ p (R's qpois convention), p in (0, 1).
 * Starts from the normal approximation and steps to the exact answer with the incomplete-gamma tail above,
 * so it is exact for any mean (a step costs one tail evaluation; a few steps at most).
 */
export function poissonQuantile(p: number, mean: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`p must be in (0, 1), got ${p}`);
  if (mean <= 0) return 0;
  const cdf = (x: number) => 1 - poissonUpperTail(x + 1, mean);
  let x = Math.max(0, Math.floor(mean + normalQuantile(p) * Math.sqrt(mean)));
  while (x > 0 && cdf(x - 1) >= p) x--;
  while (cdf(x) < p) x++;
  return x;
}
