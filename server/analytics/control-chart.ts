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
