import { poissonQuantile } from "./distributions.js";

/**
 * u-chart (nonconformities per unit with a varying sample size), applied to failures per exposure:
 * centre ū = Σcᵢ / Σnᵢ, limits ūᵢ ± 3·√(ū / nᵢ) for period i, the lower limit floored at 0.
 * Formula: NIST/SEMATECH e-Handbook of Statistical Methods, section 6.3.3.2 (counts control charts).
 * Exposure nᵢ is in the caller's unit; `per` rescales the chart (per = 1000 → failures per 1,000 engine hours).
 */
export interface UChartPoint {
  failures: number;
  exposure: number;
}
export interface UChartLimits {
  centre: number | null;
  points: { rate: number | null; lower: number | null; upper: number | null; outOfControl: boolean }[];
}

export function uChart(points: readonly UChartPoint[], per = 1000, sigmas = 3): UChartLimits {
  const totalC = points.reduce((s, p) => s + p.failures, 0);
  const totalN = points.reduce((s, p) => s + p.exposure, 0);
  if (!(totalN > 0)) return { centre: null, points: points.map(() => ({ rate: null, lower: null, upper: null, outOfControl: false })) };
  const u = totalC / totalN;
  return {
    centre: u * per,
    points: points.map((p) => {
      if (!(p.exposure > 0)) return { rate: null, lower: null, upper: null, outOfControl: false };
      const half = sigmas * Math.sqrt(u / p.exposure);
      const rate = p.failures / p.exposure;
      const lower = Math.max(0, u - half);
      const upper = u + half;
      return { rate: rate * per, lower: lower * per, upper: upper * per, outOfControl: rate > upper || rate < lower };
    }),
  };
}

/**
 * Observed ÷ expected by period, with exact probability limits. Each period's expected count E comes from its own
 * exposure (e.g. its engine hours by hour band × temperature band at a reference period's rates, as the cluster scan
 * standardises), so an ageing fleet or a cold month moves E, not the alarm. Under control the observed count is
 * Poisson(E); the limits are its 0.135 % and 99.865 % quantiles (the tail areas of 3-sigma limits on a normal),
 * i.e. probability limits rather than the normal approximation, which is poor for small E. A period is out of
 * control when O lies beyond them: above when P(X ≥ O) ≤ 0.00135, below when P(X ≤ O) < 0.00135.
 * Probability limits for counts charts: D. C. Montgomery, Introduction to Statistical Quality Control, ch. 7
 * (from memory); the quantiles follow R's qpois convention (smallest x with F(x) ≥ p).
 */
export interface StandardisedPoint {
  observed: number;
  expected: number;
}
export interface StandardisedChartPoint {
  observed: number;
  expected: number;
  /** O ÷ E; null without an expectation */
  ratio: number | null;
  /** the limits as counts and as ratios to E */
  lowerCount: number | null;
  upperCount: number | null;
  lower: number | null;
  upper: number | null;
  outOfControl: "above" | "below" | null;
}

export const PROBABILITY_LIMIT_TAIL = 0.00135;

export function standardisedChart(points: readonly StandardisedPoint[], tail = PROBABILITY_LIMIT_TAIL): StandardisedChartPoint[] {
  return points.map((p) => {
    if (!(p.expected > 0)) return { observed: p.observed, expected: p.expected, ratio: null, lowerCount: null, upperCount: null, lower: null, upper: null, outOfControl: null };
    const lowerCount = poissonQuantile(tail, p.expected);
    const upperCount = poissonQuantile(1 - tail, p.expected);
    return {
      observed: p.observed,
      expected: p.expected,
      ratio: p.observed / p.expected,
      lowerCount,
      upperCount,
      lower: lowerCount / p.expected,
      upper: upperCount / p.expected,
      outOfControl: p.observed > upperCount ? "above" : p.observed < lowerCount ? "below" : null,
    };
  });
}

const monthName = (month: string): string => {
  const [y, m] = month.split("-").map(Number);
  return `${["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"][m - 1]} ${y}`;
};
const count = (n: number) => Math.round(n).toLocaleString("en-US");

/** What a flagged month is, in words: how many failures against how many its fleet predicts, and by how much past the limit. */
export function flaggedMonthWords(month: string, p: StandardisedChartPoint): string | null {
  if (!p.outOfControl || p.ratio === null) return null;
  const head = `${monthName(month)}: ${count(p.observed)} failures where the month's engine hours, the fleet's ages and the weather predict ${count(p.expected)} (${p.ratio.toFixed(2)} times)`;
  if (p.outOfControl === "above") {
    return `${head}; at most ${count(p.upperCount!)} would be ordinary, so about ${count(p.observed - p.expected)} failures are more than the fleet's hours, ages and weather explain.`;
  }
  return `${head}; at least ${count(p.lowerCount!)} would be ordinary, so the month had fewer failures than the fleet's hours, ages and weather explain (check that its repair orders were all exported).`;
}
