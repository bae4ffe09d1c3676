import { twoSidedZ } from "./distributions.js";
import type { WeibullFit } from "./weibull.js";

/**
 * Points of a fitted Weibull line F(t) = 1 − exp(−(t/η)^β) with a pointwise band from the Fisher matrix:
 * on the plot's scale y = ln(−ln(1 − F)) = β(ln t − ln η), Var(y) ≈ (ln t − ln η)²·Var β̂ + (β/η)²·Var η̂
 * − 2(ln t − ln η)(β/η)·Cov(β̂, η̂) (delta method), limits y ± z·√Var(y) mapped back to F.
 * A Wald band for the picture; the reported parameter intervals are likelihood-ratio intervals.
 */
export function weibullLine(fit: WeibullFit, tMin: number, tMax: number, count = 40, level = 0.9) {
  const z = twoSidedZ(level);
  const { shape: b, scale: eta } = fit;
  const vb = fit.shapeStdError ** 2;
  const ve = fit.scaleStdError ** 2;
  const cov = fit.shapeScaleCovariance;
  const toF = (y: number) => 1 - Math.exp(-Math.exp(y));
  const lo = Math.log(Math.max(tMin, 1e-9));
  const hi = Math.log(Math.max(tMax, tMin * 1.01));
  return Array.from({ length: count }, (_, i) => {
    const lt = lo + ((hi - lo) * i) / (count - 1);
    const d = lt - Math.log(eta);
    const y = b * d;
    const v = d * d * vb + (b / eta) ** 2 * ve - 2 * d * (b / eta) * cov;
    const half = z * Math.sqrt(Math.max(v, 0));
    return { time: Math.exp(lt), F: toF(y), lower: toF(y - half), upper: toF(y + half) };
  });
}
