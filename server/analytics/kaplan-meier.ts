import { chiSquareUpperTail, twoSidedZ } from "./distributions.js";
import { validateLifeData, type LifeObservation } from "./life-data.js";

/** How the pointwise interval is formed: on log S (default), on S itself, or on log(−log S). */
export type KaplanMeierConfidenceType = "log" | "plain" | "log-log";

/** The curve just after one event time. */
export interface KaplanMeierStep {
  time: number;
  /** Units with entry < time ≤ exit (censored at this time still count). */
  atRisk: number;
  events: number;
  survival: number;
  /** Greenwood standard error of S: S·√Σ d/(n(n − d)); null once S = 0, where it is undefined (R survival: NA). */
  stdError: number | null;
  /** Pointwise limits; null where the chosen transform is undefined (S = 0). */
  lower: number | null;
  upper: number | null;
}

/** A quantile of the failure-time distribution read off the curve, with limits from the pointwise bands. */
export interface SurvivalQuantile {
  /** Fraction failed, F = 1 − S (0.5 = median, 0.1 = B10). */
  p: number;
  /** null when the curve never falls to 1 − p ("not reached"). */
  estimate: number | null;
  /** Where the lower band falls to 1 − p; null when it never does. */
  lower: number | null;
  /** Where the upper band falls to 1 − p; null when it never does ("not reached"). */
  upper: number | null;
}

export type MedianSurvival = Omit<SurvivalQuantile, "p">;

export interface KaplanMeierCurve {
  steps: KaplanMeierStep[];
  /** Ages of censored units (for tick marks). */
  censoredTimes: number[];
  units: number;
  events: number;
  /** Largest observed time, failed or censored: the end of the curve's last flat stretch. */
  lastTime: number;
  level: number;
  confidenceType: KaplanMeierConfidenceType;
  median: MedianSurvival;
}

export interface KaplanMeierOptions {
  level?: number;
  confidenceType?: KaplanMeierConfidenceType;
}

/** Sorted exits and entries, so that the risk set at any t is counted by two binary searches. */
interface RiskSet {
  exits: number[];
  entries: number[];
}

function riskSet(observations: readonly LifeObservation[]): RiskSet {
  return {
    exits: observations.map((o) => o.time).sort((a, b) => a - b),
    entries: observations.map((o) => o.entry ?? 0).sort((a, b) => a - b),
  };
}

/** Number of values in a sorted array that are < x. */
function countBelow(sorted: readonly number[], x: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** n(t) = #{entry < t ≤ exit} = #{exit ≥ t} − #{entry ≥ t}. */
function atRiskAt(r: RiskSet, t: number): number {
  return r.exits.length - countBelow(r.exits, t) - (r.entries.length - countBelow(r.entries, t));
}

/** Distinct failure ages with their failure counts, ascending. */
function eventCounts(observations: readonly LifeObservation[]): Map<number, number> {
  const counts = new Map<number, number>();
  for (const o of [...observations].filter((x) => x.event === 1).sort((a, b) => a.time - b.time)) {
    counts.set(o.time, (counts.get(o.time) ?? 0) + 1);
  }
  return counts;
}

function limits(
  survival: number,
  greenwood: number,
  z: number,
  type: KaplanMeierConfidenceType,
): { lower: number | null; upper: number | null } {
  if (survival <= 0 || !Number.isFinite(greenwood)) return { lower: null, upper: null };
  const sigma = Math.sqrt(greenwood);
  if (type === "plain") {
    const se = survival * sigma;
    return { lower: Math.max(0, survival - z * se), upper: Math.min(1, survival + z * se) };
  }
  if (type === "log") {
    return { lower: survival * Math.exp(-z * sigma), upper: Math.min(1, survival * Math.exp(z * sigma)) };
  }
  if (survival >= 1) return { lower: 1, upper: 1 };
  const spread = (z * sigma) / Math.abs(Math.log(survival));
  return { lower: survival ** Math.exp(spread), upper: survival ** Math.exp(-spread) };
}

/** R survival's default tolerance for "the curve sits exactly at 1 − p": sqrt(.Machine$double.eps). */
const QUANTILE_TOLERANCE = Math.sqrt(2.220446049250313e-16);

/**
 * Where a step curve of F = 1 − S (values `f` just after each time in `times`, F = 0 before the first) reaches p,
 * by the rules of R survival's quantile.survfit (its findq): F within the tolerance of p on a flat stretch gives
 * the midpoint of that stretch (to the next jump, or to `lastTime` when the stretch runs to the end of the curve);
 * otherwise the first time F ≥ p. Repeated values are dropped first (the first time at each level is kept) and
 * undefined band values (null, where S = 0) are skipped. null when the curve never reaches p.
 */
function curveQuantile(times: readonly number[], f: readonly (number | null)[], p: number, lastTime: number): number | null {
  const xs: number[] = [0];
  const ys: (number | null)[] = [0];
  const seen = new Set<number | null>([0]);
  for (let i = 0; i < times.length; i++) {
    if (seen.has(f[i])) continue;
    seen.add(f[i]);
    xs.push(times[i]);
    ys.push(f[i]);
  }
  let highest = -Infinity;
  for (const y of ys) if (y !== null && y > highest) highest = y;
  if (highest < p) return null;
  // R reads the index off approx(y ± tol, 1:n, p, "constant", f = 1), which sorts by y: the point with the
  // smallest F at or above the line (for a monotone curve, simply the first one).
  const lowestAtOrAbove = (shift: number): number | null => {
    let best: number | null = null;
    for (let i = 0; i < ys.length; i++) {
      const y = ys[i];
      if (y !== null && y + shift >= p && (best === null || y < (ys[best] as number))) best = i;
    }
    return best;
  };
  const i1 = lowestAtOrAbove(QUANTILE_TOLERANCE);
  if (i1 === null) return null;
  const last = ys[ys.length - 1];
  if (last !== null && Math.abs(p - last) < QUANTILE_TOLERANCE) return (xs[i1] + lastTime) / 2;
  const i2 = lowestAtOrAbove(-QUANTILE_TOLERANCE);
  if (i2 === null) return null;
  return (xs[i1] + xs[i2]) / 2;
}

/**
 * The age by which a fraction p of units has failed (p = 0.5: median; p = 0.1: B10 life), with its limits, by
 * the conventions of R survival's quantile.survfit: the estimate is where a horizontal line at S = 1 − p meets
 * the curve (the midpoint of a flat stretch that sits exactly at 1 − p, within √ε); the lower and upper limits
 * are where it meets the lower and upper pointwise bands; a curve or band that never gets down to 1 − p gives
 * null ("not reached"), never the last time observed.
 */
export function kaplanMeierQuantile(curve: KaplanMeierCurve, p: number): SurvivalQuantile {
  if (!(p > 0 && p < 1)) throw new RangeError(`p must be in (0, 1), got ${p}`);
  const times = curve.steps.map((s) => s.time);
  const failed = (v: number | null) => (v === null ? null : 1 - v);
  return {
    p,
    estimate: curveQuantile(times, curve.steps.map((s) => 1 - s.survival), p, curve.lastTime),
    lower: curveQuantile(times, curve.steps.map((s) => failed(s.lower)), p, curve.lastTime),
    upper: curveQuantile(times, curve.steps.map((s) => failed(s.upper)), p, curve.lastTime),
  };
}

/**
 * Kaplan–Meier estimate Ŝ(t) = Π_{tᵢ ≤ t} (1 − dᵢ/nᵢ) with Greenwood's variance.
 *
 * nᵢ counts units with entry < tᵢ ≤ exit, so delayed entry is handled through the risk set and a unit censored
 * at tᵢ is still at risk at tᵢ (censoring after events). Var log Ŝ = Σ d/(n(n − d)) (Greenwood).
 * Interval types: "log" (default) Ŝ·exp(±z·se(log Ŝ)), upper capped at 1; "plain" Ŝ ± z·se(Ŝ), clipped to
 * [0, 1]; "log-log" Ŝ^{exp(±z·se(log Ŝ)/|log Ŝ|)}. z = Φ⁻¹(1 − (1 − level)/2), default 95 %.
 * Median and other quantiles by R survival's quantile.survfit conventions ({@link kaplanMeierQuantile}); where
 * Ŝ reaches 0 the standard error and the limits are undefined (null), as R reports NA there.
 * Time unit is the caller's (engine hours since install). Steps are listed at failure times only.
 */
export function kaplanMeier(observations: readonly LifeObservation[], options: KaplanMeierOptions = {}): KaplanMeierCurve {
  validateLifeData(observations);
  const level = options.level ?? 0.95;
  const confidenceType = options.confidenceType ?? "log";
  const z = twoSidedZ(level);
  const risk = riskSet(observations);
  const steps: KaplanMeierStep[] = [];
  let survival = 1;
  let greenwood = 0;
  for (const [time, events] of eventCounts(observations)) {
    const atRisk = atRiskAt(risk, time);
    survival *= 1 - events / atRisk;
    greenwood += atRisk > events ? events / (atRisk * (atRisk - events)) : Infinity;
    const { lower, upper } = limits(survival, greenwood, z, confidenceType);
    const stdError = survival > 0 && Number.isFinite(greenwood) ? survival * Math.sqrt(greenwood) : null;
    steps.push({ time, atRisk, events, survival, stdError, lower, upper });
  }
  const censoredTimes = observations.filter((o) => o.event === 0).map((o) => o.time).sort((a, b) => a - b);
  const curve: KaplanMeierCurve = {
    steps,
    censoredTimes,
    units: observations.length,
    events: steps.reduce((n, s) => n + s.events, 0),
    lastTime: Math.max(steps.at(-1)?.time ?? 0, censoredTimes.at(-1) ?? 0),
    level,
    confidenceType,
    median: { estimate: null, lower: null, upper: null },
  };
  const { estimate, lower, upper } = kaplanMeierQuantile(curve, 0.5);
  curve.median = { estimate, lower, upper };
  return curve;
}

/** Ŝ(t) read off a curve: the survival of the last step at or before t (1 before the first failure). */
export function survivalAt(curve: KaplanMeierCurve, t: number): number {
  let value = 1;
  for (const step of curve.steps) {
    if (step.time > t) break;
    value = step.survival;
  }
  return value;
}

export interface LogRankTest {
  observedA: number;
  expectedA: number;
  observedB: number;
  expectedB: number;
  /** Hypergeometric variance of O_A − E_A. */
  variance: number;
  statistic: number;
  df: 1;
  pValue: number;
}

/**
 * Log-rank test of equal survival curves in two groups (Mantel 1966; the "survdiff" form, rho = 0).
 * At each distinct failure time with n = n_A + n_B at risk and d failures:
 *   E_A += d·n_A/n,  V += d·(n_A/n)(n_B/n)(n − d)/(n − 1).
 * Statistic (O_A − E_A)²/V on 1 df. Risk sets follow {@link kaplanMeier} (delayed entry, censoring after events).
 * Most sensitive to proportional hazards; crossing curves can hide a difference.
 */
export function logRankTest(groupA: readonly LifeObservation[], groupB: readonly LifeObservation[]): LogRankTest {
  validateLifeData(groupA);
  validateLifeData(groupB);
  const riskA = riskSet(groupA);
  const riskB = riskSet(groupB);
  const eventsA = eventCounts(groupA);
  const eventsB = eventCounts(groupB);
  const times = [...new Set([...eventsA.keys(), ...eventsB.keys()])].sort((x, y) => x - y);
  let observedA = 0;
  let expectedA = 0;
  let variance = 0;
  let total = 0;
  for (const t of times) {
    const nA = atRiskAt(riskA, t);
    const n = nA + atRiskAt(riskB, t);
    const d = (eventsA.get(t) ?? 0) + (eventsB.get(t) ?? 0);
    observedA += eventsA.get(t) ?? 0;
    total += d;
    expectedA += (d * nA) / n;
    if (n > 1) variance += (d * (nA / n) * (1 - nA / n) * (n - d)) / (n - 1);
  }
  const statistic = variance > 0 ? (observedA - expectedA) ** 2 / variance : 0;
  return {
    observedA,
    expectedA,
    observedB: total - observedA,
    expectedB: total - expectedA,
    variance,
    statistic,
    df: 1,
    pValue: chiSquareUpperTail(statistic, 1),
  };
}
