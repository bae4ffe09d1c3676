/**
 * Small one-dimensional numerical tools for the likelihood fits (no library in the dependency set offers them).
 * Brent's root finder follows Brent (1973), "Algorithms for Minimization without Derivatives", ch. 4;
 * golden-section search follows Kiefer (1953). Both are textbook algorithms written out here.
 */

export interface RootOptions {
  /** Absolute tolerance on x. Default 1e-12 × max(1, |x|). */
  xTolerance?: number;
  maxIterations?: number;
}

/**
 * Brent's method: a root of f in [a, b]. f(a) and f(b) must have opposite signs (or one of them be 0).
 * Throws RangeError when the interval does not bracket a root.
 */
export function brentRoot(f: (x: number) => number, a: number, b: number, options: RootOptions = {}): number {
  const maxIterations = options.maxIterations ?? 200;
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (Math.sign(fa) === Math.sign(fb)) throw new RangeError(`brentRoot: [${a}, ${b}] does not bracket a root`);
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let i = 0; i < maxIterations; i++) {
    if (Math.sign(fb) === Math.sign(fc)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = options.xTolerance ?? 2e-16 * Math.abs(b) + 1e-13 * Math.max(1, Math.abs(b));
    const m = (c - b) / 2;
    if (Math.abs(m) <= tol || fb === 0) return b;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qa = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qa * (qa - r) - (b - a) * (r - 1));
        q = (qa - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
  }
  return b;
}

/**
 * Golden-section search for the maximum of a unimodal f on [lo, hi]; returns the arg max and the maximum.
 * Stops when the bracket is 1e-8 wide (relative): ample for profile likelihoods, whose error is quadratic in x.
 */
export function goldenSectionMax(f: (x: number) => number, lo: number, hi: number): { x: number; value: number } {
  const g = (Math.sqrt(5) - 1) / 2;
  let a = lo;
  let b = hi;
  let x1 = b - g * (b - a);
  let x2 = a + g * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  const stop = 1e-8 * Math.max(1, Math.abs(hi - lo));
  while (b - a > stop) {
    if (f1 < f2) {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + g * (b - a);
      f2 = f(x2);
    } else {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - g * (b - a);
      f1 = f(x1);
    }
  }
  return f1 >= f2 ? { x: x1, value: f1 } : { x: x2, value: f2 };
}

/**
 * Maximum of f near a starting point x0: steps outward by `step` (doubling) until f falls on both sides, then
 * golden-section search in that bracket. Assumes f is unimodal in the region searched; gives up at ±`limit`
 * from x0 and returns the best point on the boundary.
 */
export function localMax(f: (x: number) => number, x0: number, step: number, limit = 60): { x: number; value: number } {
  let a = x0 - step;
  let b = x0;
  let c = x0 + step;
  let fa = f(a);
  let fb = f(b);
  let fc = f(c);
  let s = step;
  while (fa > fb && x0 - a < limit) {
    s *= 2;
    c = b;
    fc = fb;
    b = a;
    fb = fa;
    a = b - s;
    fa = f(a);
  }
  while (fc > fb && c - x0 < limit) {
    s *= 2;
    a = b;
    fa = fb;
    b = c;
    fb = fc;
    c = b + s;
    fc = f(c);
  }
  if (fa > fb) return { x: a, value: fa };
  if (fc > fb) return { x: c, value: fc };
  return goldenSectionMax(f, a, c);
}

/**
 * The point where g crosses `target`, searching outward from x0 in direction `dir` (+1 or −1) with steps that
 * double from `step`. g(x0) must be below target. Returns null when g stays below target within `limit`.
 * Used for likelihood-ratio limits: g is the deviance and target the chi-square critical value.
 */
export function crossingFrom(
  g: (x: number) => number,
  target: number,
  x0: number,
  dir: 1 | -1,
  step: number,
  limit: number,
): number | null {
  let inner = x0;
  let s = step;
  for (;;) {
    const outer = x0 + dir * s;
    if (s > limit) return null;
    const value = g(outer);
    if (Number.isFinite(value) && value >= target) {
      return brentRoot((x) => g(x) - target, Math.min(inner, outer), Math.max(inner, outer));
    }
    if (!Number.isFinite(value)) return null;
    inner = outer;
    s *= 2;
  }
}
