import { chiSquareQuantile, chiSquareUpperTail } from "./distributions.js";
import { validateLifeData, type LifeObservation } from "./life-data.js";
import { brentRoot, crossingFrom, localMax } from "./numeric.js";

/**
 * Two-parameter Weibull life analysis: F(t) = 1 − exp(−(t/η)^β), β = shape, η = scale in the unit of t
 * (engine hours in Ironledger). Maximum likelihood with right censoring and delayed entry, profile-likelihood
 * intervals, B10 life, median-rank regression for the probability plot, and a two-group comparison.
 */

/** Returned instead of a fit when the data cannot support one. */
export interface WeibullInsufficient {
  status: "insufficient";
  reason: "too-few-failures" | "no-finite-maximum";
  failures: number;
  minimumFailures: number;
}

/** A profile-likelihood-ratio interval; a null limit means the likelihood never drops far enough (unbounded). */
export interface LikelihoodRatioInterval {
  lower: number | null;
  upper: number | null;
  level: number;
}

export interface WeibullFit {
  status: "fitted";
  shape: number;
  scale: number;
  /** ln L in the units of the input times (it shifts by −r·ln c if times are divided by c). */
  logLikelihood: number;
  units: number;
  failures: number;
  delayedEntry: boolean;
  /** Standard errors and covariance from the inverse observed information at the MLE. */
  shapeStdError: number;
  scaleStdError: number;
  shapeScaleCovariance: number;
  /** B10 life η(−ln 0.9)^{1/β}: the age by which 10 % have failed. */
  b10: number;
  /** Profile-likelihood-ratio intervals at `level` (null when intervals were not requested). */
  shapeInterval: LikelihoodRatioInterval | null;
  scaleInterval: LikelihoodRatioInterval | null;
  b10Interval: LikelihoodRatioInterval | null;
}

export interface WeibullFitOptions {
  /** Confidence level of the likelihood-ratio intervals; default 0.90 (DOMAIN.md). */
  level?: number;
  /** Fewest failures to fit; default 5 (DOMAIN.md: below that show Kaplan–Meier only). */
  minimumFailures?: number;
  /** Set false to skip the interval searches (faster, e.g. inside scans). */
  intervals?: boolean;
}

/** Search range for the shape; fits whose maximum lies on the edge are reported as "no-finite-maximum". */
const LOG_SHAPE_MIN = Math.log(0.01);
const LOG_SHAPE_MAX = Math.log(200);
const SHAPE_GRID = 120;
const B10_LOG_K = Math.log(-Math.log(0.9));

/**
 * A sample rescaled by c = its largest time, so that every t/c ≤ 1 and t^β cannot overflow for any β searched.
 * Sums over entries skip units with entry 0 (their S(entry) = 1).
 */
interface Sample {
  logT: Float64Array;
  logE: Float64Array;
  hasEntry: Uint8Array;
  failures: number;
  /** Σ ln(t/c) over failures. */
  sumLogFailures: number;
  logScale: number;
  units: number;
  delayedEntry: boolean;
}

interface PowerSums {
  /** Σ (t^β − e^β) */
  a0: number;
  /** Σ (t^β ln t − e^β ln e) */
  a1: number;
  /** Σ (t^β ln²t − e^β ln²e) */
  a2: number;
}

function prepare(observations: readonly LifeObservation[], scale: number): Sample {
  const n = observations.length;
  const logScale = Math.log(scale);
  const logT = new Float64Array(n);
  const logE = new Float64Array(n);
  const hasEntry = new Uint8Array(n);
  let failures = 0;
  let sumLogFailures = 0;
  observations.forEach((o, i) => {
    logT[i] = Math.log(o.time) - logScale;
    const entry = o.entry ?? 0;
    if (entry > 0) {
      hasEntry[i] = 1;
      logE[i] = Math.log(entry) - logScale;
    }
    if (o.event === 1) {
      failures++;
      sumLogFailures += logT[i];
    }
  });
  return { logT, logE, hasEntry, failures, sumLogFailures, logScale, units: n, delayedEntry: hasEntry.includes(1) };
}

const largestTime = (observations: readonly LifeObservation[]): number =>
  observations.reduce((m, o) => Math.max(m, o.time), 0);

function powerSums(s: Sample, beta: number): PowerSums {
  let a0 = 0;
  let a1 = 0;
  let a2 = 0;
  for (let i = 0; i < s.units; i++) {
    const lt = s.logT[i];
    const tb = Math.exp(beta * lt);
    a0 += tb;
    a1 += tb * lt;
    a2 += tb * lt * lt;
    if (s.hasEntry[i]) {
      const le = s.logE[i];
      const eb = Math.exp(beta * le);
      a0 -= eb;
      a1 -= eb * le;
      a2 -= eb * le * le;
    }
  }
  return { a0, a1, a2 };
}

/** ln L(β, θ = ln η) on the rescaled times: r ln β − rβθ + (β − 1)Σ ln t − e^{−βθ} Σ(t^β − e^β). */
function logLik(s: Sample, beta: number, theta: number): number {
  const { a0 } = powerSums(s, beta);
  return s.failures * (Math.log(beta) - beta * theta) + (beta - 1) * s.sumLogFailures - Math.exp(-beta * theta) * a0;
}

/**
 * ln L with η profiled out. Setting ∂ℓ/∂η = 0 gives η^β = Σ(t^β − e^β)/r in closed form, with or without
 * delayed entry (the entry terms have the same form as the exposure terms), so the fit is one-dimensional in β.
 */
function profileLogLik(s: Sample, beta: number): number {
  const { a0 } = powerSums(s, beta);
  const r = s.failures;
  return r * Math.log(beta) - r * Math.log(a0 / r) + (beta - 1) * s.sumLogFailures - r;
}

/** d/dβ of {@link profileLogLik}: r/β − r·A1/A0 + Σ ln t. */
function profileScore(s: Sample, beta: number): number {
  const { a0, a1 } = powerSums(s, beta);
  return s.failures / beta - (s.failures * a1) / a0 + s.sumLogFailures;
}

const scaleThetaAt = (s: Sample, beta: number): number => Math.log(powerSums(s, beta).a0 / s.failures) / beta;

/**
 * Maximises a profile log-likelihood in u = ln β: a grid over [0.01, 200] finds the highest cell (guarding
 * against several local maxima, which delayed entry can create), then Brent's method solves score = 0 in the
 * cells either side. Returns null when the maximum is on the edge of the range.
 */
function maximiseShape(lp: (beta: number) => number, score: (beta: number) => number): number | null {
  const step = (LOG_SHAPE_MAX - LOG_SHAPE_MIN) / SHAPE_GRID;
  let best = 0;
  let bestValue = -Infinity;
  for (let k = 0; k <= SHAPE_GRID; k++) {
    const value = lp(Math.exp(LOG_SHAPE_MIN + k * step));
    if (value > bestValue) {
      bestValue = value;
      best = k;
    }
  }
  if (best === 0 || best === SHAPE_GRID) return null;
  const lo = LOG_SHAPE_MIN + (best - 1) * step;
  const hi = LOG_SHAPE_MIN + (best + 1) * step;
  const g = (u: number): number => score(Math.exp(u));
  if (g(lo) > 0 && g(hi) < 0) return Math.exp(brentRoot(g, lo, hi));
  return Math.exp(localMax((u) => lp(Math.exp(u)), LOG_SHAPE_MIN + best * step, step / 2).x);
}

/** Observed information in (β, θ) at the MLE, inverted: Var β, Var θ, Cov. Uses e^{−βθ}A0 = r there. */
function inverseInformation(s: Sample, beta: number, theta: number): { vBeta: number; vTheta: number; cov: number } {
  const { a0, a1, a2 } = powerSums(s, beta);
  const r = s.failures;
  const k = Math.exp(-beta * theta);
  const iBB = r / (beta * beta) + k * (a2 - 2 * theta * a1 + theta * theta * a0);
  const iTT = beta * beta * k * a0;
  const iBT = -beta * k * (a1 - theta * a0);
  const det = iBB * iTT - iBT * iBT;
  return { vBeta: iTT / det, vTheta: iBB / det, cov: -iBT / det };
}

/**
 * Profile-likelihood-ratio interval for a scalar ψ: the set {ψ : 2(ℓ̂ − ℓ*(ψ)) ≤ χ²₁(level)}, where ℓ*(ψ)
 * maximises ℓ over the other parameters. `step` (a standard error on the ψ scale) starts the outward search.
 */
function lrInterval(
  profiled: (psi: number) => number,
  maxLogLik: number,
  psiHat: number,
  step: number,
  level: number,
  range: [number, number] = [-Infinity, Infinity],
): { lower: number | null; upper: number | null } {
  const critical = chiSquareQuantile(level, 1);
  const deviance = (psi: number): number =>
    psi <= range[0] || psi >= range[1] ? Infinity : 2 * (maxLogLik - profiled(psi));
  const s = Number.isFinite(step) && step > 0 ? Math.min(step, 1) : 0.1;
  const reach = 50;
  return {
    lower: crossingFrom(deviance, critical, psiHat, -1, s, reach),
    upper: crossingFrom(deviance, critical, psiHat, 1, s, reach),
  };
}

function intervalOnScale(
  raw: { lower: number | null; upper: number | null },
  toValue: (psi: number) => number,
  level: number,
): LikelihoodRatioInterval {
  return {
    lower: raw.lower === null ? null : toValue(raw.lower),
    upper: raw.upper === null ? null : toValue(raw.upper),
    level,
  };
}

/** ℓ maximised over β with θ given as a function of β (a fixed η, a fixed B10, …), searched near the MLE. */
function maxOverShape(s: Sample, thetaOf: (beta: number) => number, logBetaHat: number): number {
  return localMax((u) => logLik(s, Math.exp(u), thetaOf(Math.exp(u))), logBetaHat, 0.05).value;
}

function countFailures(observations: readonly LifeObservation[]): number {
  return observations.reduce((n, o) => n + o.event, 0);
}

function insufficient(failures: number, minimumFailures: number, reason: WeibullInsufficient["reason"]): WeibullInsufficient {
  return { status: "insufficient", reason, failures, minimumFailures };
}

/**
 * Weibull maximum-likelihood fit with right censoring and optional delayed entry:
 *
 *   L(β, η) = Π f(tᵢ)^δᵢ · S(tᵢ)^(1−δᵢ) / S(entryᵢ),   S(t) = exp(−(t/η)^β),  f = −S′.
 *
 * Method: η is profiled out in closed form (η^β = Σ(tᵢ^β − entryᵢ^β)/r, valid with delayed entry too) and the
 * one-dimensional profile in β is maximised by a grid plus Brent's method on its score. Standard errors come
 * from the inverse observed information at the MLE; intervals for β, η and B10 are profile-likelihood-ratio
 * intervals {ψ : 2(ℓ̂ − ℓ*(ψ)) ≤ χ²₁(level)}, default level 90 %. Units: β unitless, η and B10 in the time unit.
 * Censored units stay in as exposure (dropping survivors is the classic error); nothing is excluded, and invalid
 * rows (time ≤ 0, entry ≥ time) throw. Fewer than `minimumFailures` failures (default 5) returns "insufficient".
 */
export function fitWeibull(
  observations: readonly LifeObservation[],
  options: WeibullFitOptions = {},
): WeibullFit | WeibullInsufficient {
  validateLifeData(observations);
  const level = options.level ?? 0.9;
  const minimumFailures = options.minimumFailures ?? 5;
  const failures = countFailures(observations);
  if (failures < minimumFailures) return insufficient(failures, minimumFailures, "too-few-failures");
  const s = prepare(observations, largestTime(observations));
  const beta = maximiseShape((b) => profileLogLik(s, b), (b) => profileScore(s, b));
  if (beta === null) return insufficient(failures, minimumFailures, "no-finite-maximum");
  const theta = scaleThetaAt(s, beta);
  const maxLogLik = logLik(s, beta, theta);
  const { vBeta, vTheta, cov } = inverseInformation(s, beta, theta);
  const scale = Math.exp(theta + s.logScale);
  const b10 = scale * Math.exp(B10_LOG_K / beta);
  const fit: WeibullFit = {
    status: "fitted",
    shape: beta,
    scale,
    logLikelihood: maxLogLik - failures * s.logScale,
    units: s.units,
    failures,
    delayedEntry: s.delayedEntry,
    shapeStdError: Math.sqrt(vBeta),
    scaleStdError: scale * Math.sqrt(vTheta),
    shapeScaleCovariance: scale * cov,
    b10,
    shapeInterval: null,
    scaleInterval: null,
    b10Interval: null,
  };
  if (options.intervals === false) return fit;

  const uHat = Math.log(beta);
  const shapeRaw = lrInterval((u) => profileLogLik(s, Math.exp(u)), maxLogLik, uHat, Math.sqrt(vBeta) / beta, level, [
    LOG_SHAPE_MIN,
    LOG_SHAPE_MAX,
  ]);
  const scaleRaw = lrInterval((th) => maxOverShape(s, () => th, uHat), maxLogLik, theta, Math.sqrt(vTheta), level);
  // ln B10 = θ + ln(−ln 0.9)/β; its delta-method SE only sets the search step.
  const dB = -B10_LOG_K / (beta * beta);
  const seLogB10 = Math.sqrt(Math.max(0, vTheta + dB * dB * vBeta + 2 * dB * cov));
  const logB10 = theta + B10_LOG_K / beta;
  const b10Raw = lrInterval((lb) => maxOverShape(s, (b) => lb - B10_LOG_K / b, uHat), maxLogLik, logB10, seLogB10, level);
  const toTime = (psi: number): number => Math.exp(psi + s.logScale);
  fit.shapeInterval = intervalOnScale(shapeRaw, Math.exp, level);
  fit.scaleInterval = intervalOnScale(scaleRaw, toTime, level);
  fit.b10Interval = intervalOnScale(b10Raw, toTime, level);
  return fit;
}

/**
 * Weibull log-likelihood ln L(β, η) of {@link fitWeibull} at given parameters, in the units of the input times:
 * Σ δ[ln β − β ln η + (β − 1) ln t] − Σ (t/η)^β + Σ (entry/η)^β.
 */
export function weibullLogLikelihood(observations: readonly LifeObservation[], shape: number, scale: number): number {
  validateLifeData(observations);
  const s = prepare(observations, largestTime(observations));
  return logLik(s, shape, Math.log(scale) - s.logScale) - s.failures * s.logScale;
}

/** Weibull quantile (the age by which a fraction p has failed): η(−ln(1 − p))^{1/β}. B10 is p = 0.1. */
export function weibullQuantile(p: number, shape: number, scale: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`p must be in (0, 1), got ${p}`);
  return scale * Math.pow(-Math.log1p(-p), 1 / shape);
}

/** Weibull survival S(t) = exp(−(t/η)^β): the fraction still working at age t. */
export function weibullSurvival(t: number, shape: number, scale: number): number {
  return Math.exp(-Math.pow(t / scale, shape));
}

/** One point of a Weibull probability plot. */
export interface ProbabilityPlotPoint {
  time: number;
  /** Johnson's adjusted rank (equals i = 1…n when nothing is censored). */
  adjustedRank: number;
  /** Bernard's median rank (j − 0.3)/(n + 0.4). */
  medianRank: number;
  /** ln t */
  x: number;
  /** ln(−ln(1 − F)) */
  y: number;
}

/** Which variable is regressed on which. */
export type RankRegressionDirection = "y-on-x" | "x-on-y";

export interface RankRegressionFit {
  direction: RankRegressionDirection;
  shape: number;
  scale: number;
  /** Squared correlation of the plot points (the same for both directions). */
  rSquared: number;
  points: ProbabilityPlotPoint[];
}

/**
 * Points of a Weibull probability plot, failures only. Units are sorted by time (at equal times failures come
 * before censored units); each failure gets Johnson's adjusted rank
 *   jᵢ = j_prev + (n + 1 − j_prev) / (1 + number of units from this one onwards, this one excluded)
 * (equivalently [reverse rank × j_prev + n + 1]/[reverse rank + 1]); censored units only shift later ranks.
 * F = Bernard's (j − 0.3)/(n + 0.4); axes x = ln t, y = ln(−ln(1 − F)). Delayed entry is not represented.
 */
export function weibullPlotPoints(observations: readonly LifeObservation[]): ProbabilityPlotPoint[] {
  validateLifeData(observations);
  const n = observations.length;
  const sorted = [...observations].sort((a, b) => a.time - b.time || b.event - a.event);
  const points: ProbabilityPlotPoint[] = [];
  let previous = 0;
  sorted.forEach((o, i) => {
    if (o.event !== 1) return;
    const reverseRank = n - i;
    previous = (reverseRank * previous + n + 1) / (reverseRank + 1);
    const medianRank = (previous - 0.3) / (n + 0.4);
    points.push({ time: o.time, adjustedRank: previous, medianRank, x: Math.log(o.time), y: Math.log(-Math.log1p(-medianRank)) });
  });
  return points;
}

/**
 * Median-rank regression (least squares on the probability plot of {@link weibullPlotPoints}).
 * "y-on-x" (RRY): Y = βX − β ln η, so β = slope, η = exp(−intercept/slope).
 * "x-on-y" (RRX): X = ln η + Y/β, so β = 1/slope, η = exp(intercept).
 * The direction is required because the two give different estimates. Needs ≥ 2 failures (else null).
 * A graphical estimator: prefer {@link fitWeibull} for inference; this has no intervals.
 */
export function weibullRankRegression(
  observations: readonly LifeObservation[],
  direction: RankRegressionDirection,
): RankRegressionFit | null {
  const points = weibullPlotPoints(observations);
  const m = points.length;
  if (m < 2) return null;
  const mx = points.reduce((sum, p) => sum + p.x, 0) / m;
  const my = points.reduce((sum, p) => sum + p.y, 0) / m;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  for (const p of points) {
    sxx += (p.x - mx) ** 2;
    syy += (p.y - my) ** 2;
    sxy += (p.x - mx) * (p.y - my);
  }
  const rSquared = (sxy * sxy) / (sxx * syy);
  if (direction === "y-on-x") {
    const slope = sxy / sxx;
    const intercept = my - slope * mx;
    return { direction, shape: slope, scale: Math.exp(-intercept / slope), rSquared, points };
  }
  const slope = sxy / syy;
  const intercept = mx - slope * my;
  return { direction, shape: 1 / slope, scale: Math.exp(intercept), rSquared, points };
}

/** A likelihood-ratio test result. */
export interface LikelihoodRatioTest {
  /** What the null hypothesis says, in words. */
  hypothesis: string;
  statistic: number;
  df: number;
  pValue: number;
}

export interface RatioEstimate {
  estimate: number;
  lower: number | null;
  upper: number | null;
  level: number;
}

export interface WeibullComparison {
  status: "compared";
  groupA: WeibullFit;
  groupB: WeibullFit;
  /** The common-shape model: one β, separate scales. */
  commonShape: { shape: number; scaleA: number; scaleB: number; logLikelihood: number };
  /** One Weibull for both groups together. */
  pooled: { shape: number; scale: number; logLikelihood: number };
  /** η_A/η_B under the common shape, with a profile-likelihood-ratio interval. */
  scaleRatio: RatioEstimate;
  /** Hazard of A relative to B under the common shape, (η_B/η_A)^β, with a profile-likelihood-ratio interval. */
  hazardRatio: RatioEstimate;
  /** Pooled (2 parameters) vs common shape with separate scales (3): df 1. */
  sameDistribution: LikelihoodRatioTest;
  /** Common shape (3 parameters) vs separate shapes and scales (4): df 1; checks the common-β assumption. */
  sameShape: LikelihoodRatioTest;
}

export interface WeibullComparisonInsufficient {
  status: "insufficient";
  groupA: WeibullFit | WeibullInsufficient;
  groupB: WeibullFit | WeibullInsufficient;
}

/**
 * Compares two cohorts (e.g. a supplier lot against the rest) with Weibull models fitted on the same time unit:
 *
 * - each group separately (β_A, η_A, β_B, η_B);
 * - a common shape with separate scales (β, η_A, η_B), maximised by profiling both scales out in closed form;
 * - one pooled Weibull (β, η).
 *
 * `sameDistribution` is the LR test of H0 "both groups have one Weibull distribution" against "common shape,
 * different scales": 2(ℓ_common − ℓ_pooled) on 1 df; with the shape shared it is a test that η_A = η_B.
 * `sameShape` tests the common-shape assumption itself: 2(ℓ_separate − ℓ_common) on 1 df; if it is small the
 * scale and hazard ratios below are interpretable as a constant ratio.
 * Scale ratio η_A/η_B and hazard ratio (η_B/η_A)^β are reported under the common shape with
 * profile-likelihood-ratio intervals at `level` (default 90 %). Each group needs ≥ `minimumFailures` failures.
 */
export function compareWeibull(
  groupA: readonly LifeObservation[],
  groupB: readonly LifeObservation[],
  options: WeibullFitOptions = {},
): WeibullComparison | WeibullComparisonInsufficient {
  const level = options.level ?? 0.9;
  const fitA = fitWeibull(groupA, options);
  const fitB = fitWeibull(groupB, options);
  if (fitA.status !== "fitted" || fitB.status !== "fitted") return { status: "insufficient", groupA: fitA, groupB: fitB };
  const scale = Math.max(largestTime(groupA), largestTime(groupB));
  const a = prepare(groupA, scale);
  const b = prepare(groupB, scale);
  const offset = (a.failures + b.failures) * a.logScale;

  const beta = maximiseShape(
    (x) => profileLogLik(a, x) + profileLogLik(b, x),
    (x) => profileScore(a, x) + profileScore(b, x),
  );
  const pooledFit = fitWeibull([...groupA, ...groupB], { ...options, intervals: false, minimumFailures: 1 });
  if (beta === null || pooledFit.status !== "fitted") return { status: "insufficient", groupA: fitA, groupB: fitB };
  const thetaA = scaleThetaAt(a, beta);
  const thetaB = scaleThetaAt(b, beta);
  const commonLogLik = profileLogLik(a, beta) + profileLogLik(b, beta);
  const separateLogLik = fitA.logLikelihood + fitB.logLikelihood;
  const pooledLogLik = pooledFit.logLikelihood;

  // Under a common β with log-scale difference ρ = θ_A − θ_B, θ_B has the closed form
  // e^{βθ_B} = (e^{−βρ}A_A + A_B)/R, which leaves ℓ(β; ρ) = R ln β − R ln(W/R) − β r_A ρ + (β − 1)ΣS − R.
  const rTotal = a.failures + b.failures;
  const sumLog = a.sumLogFailures + b.sumLogFailures;
  const withFixedRatio = (x: number, logWeightA: number, linear: number): number => {
    const w = Math.exp(logWeightA) * powerSums(a, x).a0 + powerSums(b, x).a0;
    return rTotal * Math.log(x) - rTotal * Math.log(w / rTotal) + linear + (x - 1) * sumLog - rTotal;
  };
  const uHat = Math.log(beta);
  const rhoHat = thetaA - thetaB;
  const profileRho = (rho: number): number =>
    localMax((u) => withFixedRatio(Math.exp(u), -Math.exp(u) * rho, -Math.exp(u) * a.failures * rho), uHat, 0.05).value;
  // ln HR = ψ = −βρ, so e^{−βρ} = e^{ψ} and −β r_A ρ = r_A ψ.
  const profilePsi = (psi: number): number => localMax((u) => withFixedRatio(Math.exp(u), psi, a.failures * psi), uHat, 0.05).value;
  const seRho = Math.sqrt(
    (fitA.scaleStdError / fitA.scale) ** 2 + (fitB.scaleStdError / fitB.scale) ** 2,
  );
  const rhoRaw = lrInterval(profileRho, commonLogLik, rhoHat, seRho, level);
  const psiRaw = lrInterval(profilePsi, commonLogLik, -beta * rhoHat, beta * seRho, level);

  const test = (hypothesis: string, statistic: number): LikelihoodRatioTest => {
    const clipped = Math.max(0, statistic);
    return { hypothesis, statistic: clipped, df: 1, pValue: chiSquareUpperTail(clipped, 1) };
  };
  return {
    status: "compared",
    groupA: fitA,
    groupB: fitB,
    commonShape: {
      shape: beta,
      scaleA: Math.exp(thetaA + a.logScale),
      scaleB: Math.exp(thetaB + b.logScale),
      logLikelihood: commonLogLik - offset,
    },
    pooled: { shape: pooledFit.shape, scale: pooledFit.scale, logLikelihood: pooledLogLik },
    scaleRatio: { estimate: Math.exp(rhoHat), ...intervalOnScale(rhoRaw, Math.exp, level) },
    hazardRatio: { estimate: Math.exp(-beta * rhoHat), ...intervalOnScale(psiRaw, Math.exp, level) },
    sameDistribution: test(
      "both groups follow one Weibull distribution (given a common shape, the scales are equal)",
      2 * (commonLogLik - offset - pooledLogLik),
    ),
    sameShape: test("the two groups share one Weibull shape (scales may differ)", 2 * (separateLogLik - (commonLogLik - offset))),
  };
}
