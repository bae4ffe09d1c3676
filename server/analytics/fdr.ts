/** Multiple-testing result, in the order the p-values were given. */
export interface FdrResult {
  /** Adjusted p-values (for BH: the "q-values"). */
  adjusted: number[];
  /** true where adjusted ≤ the false-discovery rate. */
  rejected: boolean[];
  rejections: number;
  rate: number;
}

function assertPValues(pValues: readonly number[]): void {
  for (const p of pValues) {
    if (!(p >= 0 && p <= 1)) throw new RangeError(`p-values must lie in [0, 1], got ${p}`);
  }
}

/**
 * Benjamini–Hochberg (1995) step-up procedure controlling the false-discovery rate at `rate` (default 0.05).
 *
 * Sort p ascending as p_(1) ≤ … ≤ p_(m); adjusted q_(i) = min_{j ≥ i} min(1, p_(j)·m/j) (the monotone
 * "reversed cumulative minimum"). H_(i) is rejected when q_(i) ≤ rate, which is the same as rejecting
 * H_(1)…H_(k) for the largest k with p_(k) ≤ k·rate/m. Assumes independent or positively dependent tests;
 * m is the number of p-values given (untested cells must not be passed in).
 */
export function benjaminiHochberg(pValues: readonly number[], rate = 0.05): FdrResult {
  assertPValues(pValues);
  const m = pValues.length;
  const order = pValues.map((p, i) => ({ p, i })).sort((a, b) => a.p - b.p || a.i - b.i);
  const adjusted = new Array<number>(m);
  let running = 1;
  for (let k = m - 1; k >= 0; k--) {
    running = Math.min(running, (order[k].p * m) / (k + 1));
    adjusted[order[k].i] = running;
  }
  const rejected = adjusted.map((q) => q <= rate);
  return { adjusted, rejected, rejections: rejected.filter(Boolean).length, rate };
}

/**
 * Bonferroni adjustment min(1, m·p): controls the family-wise error rate, more conservative than BH.
 * Shown beside BH so an analyst can see which signals survive the stricter rule.
 */
export function bonferroni(pValues: readonly number[], rate = 0.05): FdrResult {
  assertPValues(pValues);
  const m = pValues.length;
  const adjusted = pValues.map((p) => Math.min(1, p * m));
  const rejected = adjusted.map((q) => q <= rate);
  return { adjusted, rejected, rejections: rejected.filter(Boolean).length, rate };
}
