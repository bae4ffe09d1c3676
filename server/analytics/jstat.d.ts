/**
 * The part of jStat 1.9.6 that the analytics modules call. jStat ships no type declarations; under ESM its
 * CommonJS `module.exports = jStat` arrives as the default import (checked by tests/unit/analytics/distributions.test.ts).
 */
declare module "jstat" {
  interface JStatStatic {
    normal: {
      cdf(x: number, mean: number, sd: number): number;
      inv(p: number, mean: number, sd: number): number;
    };
    chisquare: {
      cdf(x: number, dof: number): number;
      inv(p: number, dof: number): number;
    };
    beta: {
      /** Quantile of the Beta(a, b) distribution (inverse regularised incomplete beta). */
      inv(p: number, a: number, b: number): number;
    };
    binomial: {
      pdf(k: number, n: number, p: number): number;
      cdf(k: number, n: number, p: number): number;
    };
    /** Regularised lower incomplete gamma P(a, x). */
    lowRegGamma(a: number, x: number): number;
    /** ln Γ(x). */
    gammaln(x: number): number;
  }
  const jStat: JStatStatic;
  export default jStat;
}
