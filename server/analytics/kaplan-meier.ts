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
  /** Greenwood standard error of S: S·√Σ d/(n(n − d)). */
  stdError: number;
  /** Pointwise limits; null where the chosen transform is undefined (S = 0). */
  lower: number | null;
  upper: number | null;
}

export interface MedianSurvival {
  /** null when the curve never reaches 0.5. */
  estimate: number | null;
  lower: number | null;
  upper: number | null;
}

export interface KaplanMeierCurve {
  steps: KaplanMeierStep[];
  /** Ages of censored units (for tick marks). */
  censoredTimes: number[];
  units: number;
  events: number;
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

/**
 * First time at which a step curve falls to ≤ 0.5; if it sits exactly at 0.5, the midpoint to the next step
 * (the convention of R survival's quantile.survfit). null when it never gets there.
 */
function firstAtOrBelowHalf(times: readonly number[], values: readonly (number | null)[]): number | null {
  for (let i = 0; i < times.length; i++) {
    const v = values[i] ?? 0;
    if (Math.abs(v - 0.5) < 1e-12) return i + 1 < times.length ? (times[i] + times[i + 1]) / 2 : times[i];
    if (v < 0.5) return times[i];
  }
  return null;
}

/**
 * Kaplan–Meier estimate Ŝ(t) = Π_{tᵢ ≤ t} (1 − dᵢ/nᵢ) with Greenwood's variance.
 *
 * nᵢ counts units with entry < tᵢ ≤ exit, so delayed entry is handled through the risk set and a unit censored
 * at tᵢ is still at risk at tᵢ (censoring after events). Var log Ŝ = Σ d/(n(n − d)) (Greenwood).
 * Interval types: "log" (default) Ŝ·exp(±z·se(log Ŝ)), upper capped at 1; "plain" Ŝ ± z·se(Ŝ), clipped to
 * [0, 1]; "log-log" Ŝ^{exp(±z·se(log Ŝ)/|log Ŝ|)}. z = Φ⁻¹(1 − (1 − level)/2), default 95 %.
 * Median: the first time with Ŝ ≤ 0.5; its limits are where the lower and upper bands reach 0.5.
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
    const stdError = survival > 0 ? survival * Math.sqrt(greenwood) : 0;
    steps.push({ time, atRisk, events, survival, stdError, lower, upper });
  }
  const times = steps.map((s) => s.time);
  return {
    steps,
    censoredTimes: observations.filter((o) => o.event === 0).map((o) => o.time).sort((a, b) => a - b),
    units: observations.length,
    events: steps.reduce((n, s) => n + s.events, 0),
    level,
    confidenceType,
    median: {
      estimate: firstAtOrBelowHalf(times, steps.map((s) => s.survival)),
      lower: firstAtOrBelowHalf(times, steps.map((s) => s.lower)),
      upper: firstAtOrBelowHalf(times, steps.map((s) => s.upper)),
    },
  };
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
