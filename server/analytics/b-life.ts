import { chiSquareQuantile } from "./distributions.js";
import type { LifeObservation } from "./life-data.js";
import { crossingFrom, localMax } from "./numeric.js";
import { weibullLogLikelihood, type WeibullFit } from "./weibull.js";

/** The B-lives a user may ask for: B1 … B50, the age by which 1 … 50 % of units have failed. */
export const B_LIFE_MIN = 1;
export const B_LIFE_MAX = 50;

/** A B-life with its interval; a null limit means the likelihood never drops far enough (unbounded). */
export interface BLifeEstimate {
  /** Fraction failed, e.g. 0.1 for B10. */
  p: number;
  estimate: number;
  lower: number | null;
  upper: number | null;
  level: number;
}

/**
 * Weibull B-life Bp = η(−ln(1 − p))^{1/β} (the age by which a fraction p has failed) with its profile-likelihood-
 * ratio interval {B : 2(ℓ̂ − max_β ℓ(β, η(β, B))) ≤ χ²₁(level)}, where η(β, B) = B/(−ln(1 − p))^{1/β} holds Bp
 * at B. The same construction as the B10 interval of {@link fitWeibull}, for any p in (0, 1); `observations`
 * must be those the fit was made on (same time unit). Level defaults to the fit's own (90 %, DOMAIN.md).
 */
export function weibullBLife(observations: readonly LifeObservation[], fit: WeibullFit, p: number, level?: number): BLifeEstimate {
  if (!(p > 0 && p < 1)) throw new RangeError(`p must be in (0, 1), got ${p}`);
  const lvl = level ?? fit.b10Interval?.level ?? 0.9;
  const k = Math.log(-Math.log1p(-p));
  const estimate = fit.scale * Math.exp(k / fit.shape);
  const logLik = (beta: number, logB: number) => weibullLogLikelihood(observations, beta, Math.exp(logB - k / beta));
  const uHat = Math.log(fit.shape);
  const profiled = (logB: number) => localMax((u) => logLik(Math.exp(u), logB), uHat, 0.05).value;
  const critical = chiSquareQuantile(lvl, 1);
  const deviance = (logB: number) => 2 * (fit.logLikelihood - profiled(logB));
  // delta-method SE of ln Bp = ln η + k/β, only to size the first step of the search
  const dBeta = -k / (fit.shape * fit.shape);
  const varLogScale = (fit.scaleStdError / fit.scale) ** 2;
  const covBetaLogScale = fit.shapeScaleCovariance / fit.scale;
  const se = Math.sqrt(Math.max(0, varLogScale + dBeta * dBeta * fit.shapeStdError ** 2 + 2 * dBeta * covBetaLogScale));
  const step = Number.isFinite(se) && se > 0 ? Math.min(se, 1) : 0.1;
  const logHat = Math.log(estimate);
  const lower = crossingFrom(deviance, critical, logHat, -1, step, 50);
  const upper = crossingFrom(deviance, critical, logHat, 1, step, 50);
  return { p, estimate, lower: lower === null ? null : Math.exp(lower), upper: upper === null ? null : Math.exp(upper), level: lvl };
}
