import { twoSidedZ } from "./distributions.js";

/** One repairable unit (a machine) with its repair history. */
export interface RecurrentUnit {
  id: string;
  /** Age at each repair, in the analysis unit (engine hours); a repeated age means several repairs at once. */
  eventAges: readonly number[];
  /** Age at the end of observation (last valid reading). */
  endAge: number;
  /** Age at the start of observation (delayed entry); default 0. Repairs must satisfy startAge < age ≤ endAge. */
  startAge?: number;
}

/**
 * "lawless-nadeau": the robust estimator Σᵢ [Σ_{t_k ≤ t} δᵢ(t_k)(dᵢ(t_k) − d_k/r_k)/r_k]², valid without assuming
 * a Poisson process (Lawless & Nadeau 1995). "poisson": Σ d_k/r_k², which assumes a Poisson process.
 */
export type McfVariance = "lawless-nadeau" | "poisson";

/** "plain": M ± z·se, lower limit clipped at 0; "log": M·exp(±z·se/M), always positive. */
export type McfConfidenceType = "plain" | "log";

export interface McfStep {
  age: number;
  /** Units under observation at this age: startAge < age ≤ endAge. */
  atRisk: number;
  /** Repairs at this age, all units. */
  events: number;
  /** Mean cumulative repairs per unit up to and including this age. */
  mcf: number;
  /** Standard error by the chosen variance. */
  stdError: number;
  stdErrorLawlessNadeau: number;
  stdErrorPoisson: number;
  lower: number;
  upper: number;
}

export interface McfCurve {
  steps: McfStep[];
  units: number;
  events: number;
  /** Largest end age: the curve is defined (flat after the last step) up to here. */
  lastAge: number;
  level: number;
  variance: McfVariance;
  confidenceType: McfConfidenceType;
}

export interface McfOptions {
  level?: number;
  variance?: McfVariance;
  confidenceType?: McfConfidenceType;
}

function validate(units: readonly RecurrentUnit[]): void {
  for (const u of units) {
    const start = u.startAge ?? 0;
    if (!(u.endAge > start)) throw new RangeError(`unit ${u.id}: endAge must exceed startAge`);
    for (const age of u.eventAges) {
      if (!(age > start && age <= u.endAge)) throw new RangeError(`unit ${u.id}: repair at ${age} outside (${start}, ${u.endAge}]`);
    }
  }
}

function limits(mcf: number, se: number, z: number, type: McfConfidenceType): { lower: number; upper: number } {
  if (type === "log" && mcf > 0) {
    const f = Math.exp((z * se) / mcf);
    return { lower: mcf / f, upper: mcf * f };
  }
  return { lower: Math.max(0, mcf - z * se), upper: mcf + z * se };
}

/**
 * Nonparametric mean cumulative function of recurrent repairs (Nelson 1995):
 *
 *   M̂(t) = Σ_{t_k ≤ t} d_k / r_k,
 *
 * with d_k all repairs at age t_k and r_k the units under observation then (startAge < t_k ≤ endAge, so a unit
 * whose history ends at t_k still counts at t_k). Units: repairs per unit; ages in the caller's unit.
 * Standard error: Lawless–Nadeau robust (default) or Poisson-process, both always reported; interval "plain"
 * (default, lower limit clipped at 0) or "log". Nelson's (1995) own variance estimator is not offered under
 * that name because no printed table was available to verify it (REFERENCE.md case I).
 * Excludes nothing; counts of repairs only ({@link costMeanCumulativeFunction} weights them by cost).
 */
/** A unit's repairs as (age, weight): weight 1 per repair for the count MCF, the repair's cost for the cost MCF. */
interface WeightedUnit {
  start: number;
  end: number;
  repairs: readonly { age: number; weight: number }[];
}

/** One age of the weighted MCF with the pieces both variance families need. */
interface WeightedStep {
  age: number;
  atRisk: number;
  /** Σ weights at this age, all units */
  total: number;
  /** Σ over units of (their weight at this age)² */
  sumSquares: number;
  mcf: number;
  /** Lawless–Nadeau / Nelson (1995) robust variance */
  robustVariance: number;
  /** Σ_{t_k ≤ t} total_k / r_k² (the Poisson-process variance for counts) */
  poissonVariance: number;
  /** Nelson's naive variance Σ_k Σ_{i at risk} (w_ik − w̄_k)² / r_k², which treats increments as independent */
  naiveVariance: number;
}

/**
 * The weighted MCF M̂(t) = Σ_{t_k ≤ t} W_k / r_k with W_k the weights at age t_k and r_k the units observed
 * then (start < t_k ≤ end). Unit i's term of the robust variance is Sᵢ(t) = aᵢ − C(t) while it is observed, where
 * C(t) = Σ_{t_k ≤ t} W_k/r_k² and aᵢ = C(startᵢ) + Σ (its weight at t_k)/r_k; once its history ends Sᵢ is fixed.
 * Keeping Σaᵢ and Σaᵢ² over the observed units gives Σᵢ Sᵢ² at each age without visiting every unit.
 */
function weightedSteps(units: readonly WeightedUnit[]): WeightedStep[] {
  const ages = [...new Set(units.flatMap((u) => u.repairs.map((r) => r.age)))].sort((x, y) => x - y);
  const repairsAt = new Map<number, { unit: number; weight: number }[]>();
  units.forEach((u, unit) => {
    const weights = new Map<number, number>();
    for (const r of u.repairs) weights.set(r.age, (weights.get(r.age) ?? 0) + r.weight);
    for (const [age, weight] of weights) {
      const list = repairsAt.get(age);
      if (list) list.push({ unit, weight });
      else repairsAt.set(age, [{ unit, weight }]);
    }
  });
  const byStart = units.map((u, i) => ({ i, at: u.start })).sort((x, y) => x.at - y.at);
  const byEnd = units.map((u, i) => ({ i, at: u.end })).sort((x, y) => x.at - y.at);
  /** C after each processed age, to look up C(start) and C(end) of units that start or end between ages. */
  const cAfter: number[] = [];
  const cAt = (age: number): number => {
    let lo = 0;
    let hi = cAfter.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (ages[mid] <= age) lo = mid + 1;
      else hi = mid;
    }
    return lo === 0 ? 0 : cAfter[lo - 1];
  };
  const a = new Float64Array(units.length);
  let nextStart = 0;
  let nextEnd = 0;
  let observed = 0;
  let sumA = 0;
  let sumA2 = 0;
  let finishedSquares = 0;
  let c = 0;
  let mcf = 0;
  let naive = 0;
  const steps: WeightedStep[] = [];
  for (const age of ages) {
    while (nextStart < byStart.length && byStart[nextStart].at < age) {
      const i = byStart[nextStart++].i;
      a[i] = cAt(units[i].start);
      observed++;
      sumA += a[i];
      sumA2 += a[i] * a[i];
    }
    while (nextEnd < byEnd.length && byEnd[nextEnd].at < age) {
      const i = byEnd[nextEnd++].i;
      const final = a[i] - cAt(units[i].end);
      observed--;
      sumA -= a[i];
      sumA2 -= a[i] * a[i];
      finishedSquares += final * final;
    }
    const repairs = repairsAt.get(age) ?? [];
    const total = repairs.reduce((n, r) => n + r.weight, 0);
    const sumSquares = repairs.reduce((n, r) => n + r.weight * r.weight, 0);
    const atRisk = observed;
    mcf += total / atRisk;
    c += total / (atRisk * atRisk);
    naive += Math.max(0, sumSquares - (total * total) / atRisk) / (atRisk * atRisk);
    cAfter.push(c);
    for (const { unit, weight } of repairs) {
      const before = a[unit];
      a[unit] += weight / atRisk;
      sumA += a[unit] - before;
      sumA2 += a[unit] * a[unit] - before * before;
    }
    const robustVariance = Math.max(0, finishedSquares + sumA2 - 2 * c * sumA + atRisk * c * c);
    steps.push({ age, atRisk, total, sumSquares, mcf, robustVariance, poissonVariance: c, naiveVariance: naive });
  }
  return steps;
}

export function meanCumulativeFunction(units: readonly RecurrentUnit[], options: McfOptions = {}): McfCurve {
  validate(units);
  const level = options.level ?? 0.95;
  const variance = options.variance ?? "lawless-nadeau";
  const confidenceType = options.confidenceType ?? "plain";
  const z = twoSidedZ(level);
  const weighted = units.map((u) => ({ start: u.startAge ?? 0, end: u.endAge, repairs: u.eventAges.map((age) => ({ age, weight: 1 })) }));
  const steps: McfStep[] = weightedSteps(weighted).map((w) => {
    const seLn = Math.sqrt(w.robustVariance);
    const sePoisson = Math.sqrt(w.poissonVariance);
    const stdError = variance === "poisson" ? sePoisson : seLn;
    return {
      age: w.age,
      atRisk: w.atRisk,
      events: w.total,
      mcf: w.mcf,
      stdError,
      stdErrorLawlessNadeau: seLn,
      stdErrorPoisson: sePoisson,
      ...limits(w.mcf, stdError, z, confidenceType),
    };
  });
  return {
    steps,
    units: units.length,
    events: steps.reduce((n, s) => n + s.events, 0),
    lastAge: units.reduce((m, u) => Math.max(m, u.endAge), 0),
    level,
    variance,
    confidenceType,
  };
}

/** One repair with its cost (parts + labour, in the caller's currency). */
export interface CostedRepair {
  age: number;
  cost: number;
}

/** One repairable unit with costed repairs; ages as in {@link RecurrentUnit}. */
export interface CostedUnit {
  id: string;
  repairs: readonly CostedRepair[];
  endAge: number;
  startAge?: number;
}

/**
 * "robust": Nelson's (1995) estimator, Σᵢ [Σ_{t_k ≤ t} δᵢ(t_k)(cᵢ(t_k) − c̄_k)/r_k]² (the Lawless–Nadeau form with
 * costs), valid whatever the dependence between a unit's repairs. "naive": Σ_k Σ_{i at risk} (cᵢ(t_k) − c̄_k)²/r_k²,
 * which treats the increments as independent and so is usually too small (Nelson 1995, from memory).
 */
export type CostMcfVariance = "robust" | "naive";

export interface CostMcfStep {
  age: number;
  atRisk: number;
  /** repairs at this age, all units */
  repairs: number;
  /** their total cost */
  cost: number;
  /** mean cumulative cost per unit up to and including this age */
  mcf: number;
  stdError: number;
  stdErrorRobust: number;
  stdErrorNaive: number;
  lower: number;
  upper: number;
}

export interface CostMcfCurve {
  steps: CostMcfStep[];
  units: number;
  repairs: number;
  totalCost: number;
  lastAge: number;
  level: number;
  variance: CostMcfVariance;
  confidenceType: McfConfidenceType;
}

export interface CostMcfOptions {
  level?: number;
  variance?: CostMcfVariance;
  confidenceType?: McfConfidenceType;
}

/**
 * Nelson's cost mean cumulative function (Nelson 1988; 1995): M̂(t) = Σ_{t_k ≤ t} C_k / r_k, with C_k the cost of
 * all repairs at age t_k and r_k the units under observation then (startAge < t_k ≤ endAge, as in
 * {@link meanCumulativeFunction}, to which it reduces exactly when every cost is 1). Units: cost per unit; ages
 * in the caller's unit. Variance "robust" (default) or "naive", both always reported; interval "plain" (default,
 * lower limit clipped at 0) or "log". A repair without a recorded cost must be given cost 0 or left out by the
 * caller; negative costs (credits) are refused.
 */
export function costMeanCumulativeFunction(units: readonly CostedUnit[], options: CostMcfOptions = {}): CostMcfCurve {
  validate(units.map((u) => ({ id: u.id, eventAges: u.repairs.map((r) => r.age), endAge: u.endAge, startAge: u.startAge })));
  for (const u of units) {
    for (const r of u.repairs) if (!(r.cost >= 0) || !Number.isFinite(r.cost)) throw new RangeError(`unit ${u.id}: cost must be a non-negative number, got ${r.cost}`);
  }
  const level = options.level ?? 0.95;
  const variance = options.variance ?? "robust";
  const confidenceType = options.confidenceType ?? "plain";
  const z = twoSidedZ(level);
  const repairCounts = new Map<number, number>();
  for (const u of units) for (const r of u.repairs) repairCounts.set(r.age, (repairCounts.get(r.age) ?? 0) + 1);
  const weighted = units.map((u) => ({ start: u.startAge ?? 0, end: u.endAge, repairs: u.repairs.map((r) => ({ age: r.age, weight: r.cost })) }));
  const steps: CostMcfStep[] = weightedSteps(weighted).map((w) => {
    const robust = Math.sqrt(w.robustVariance);
    const naive = Math.sqrt(w.naiveVariance);
    const stdError = variance === "naive" ? naive : robust;
    return {
      age: w.age,
      atRisk: w.atRisk,
      repairs: repairCounts.get(w.age) ?? 0,
      cost: w.total,
      mcf: w.mcf,
      stdError,
      stdErrorRobust: robust,
      stdErrorNaive: naive,
      ...limits(w.mcf, stdError, z, confidenceType),
    };
  });
  return {
    steps,
    units: units.length,
    repairs: steps.reduce((n, s) => n + s.repairs, 0),
    totalCost: steps.reduce((n, s) => n + s.cost, 0),
    lastAge: units.reduce((m, u) => Math.max(m, u.endAge), 0),
    level,
    variance,
    confidenceType,
  };
}

/** M̂(age) and its standard error read off the step curve (0 before the first repair). */
export function mcfAt(curve: McfCurve, age: number): { mcf: number; stdError: number } {
  let value = { mcf: 0, stdError: 0 };
  for (const step of curve.steps) {
    if (step.age > age) break;
    value = { mcf: step.mcf, stdError: step.stdError };
  }
  return value;
}

/**
 * Average repair rate between two ages: per × (M̂(to) − M̂(from)) / (to − from), e.g. per = 1000 gives repairs
 * per unit per 1,000 engine hours. A secant of the step curve, not a derivative; ages beyond the last
 * observed age return null (the curve says nothing there).
 */
export function mcfSlope(curve: McfCurve, fromAge: number, toAge: number, per = 1000): number | null {
  if (!(toAge > fromAge) || toAge > curve.lastAge) return null;
  return (per * (mcfAt(curve, toAge).mcf - mcfAt(curve, fromAge).mcf)) / (toAge - fromAge);
}

export interface McfDifferencePoint {
  age: number;
  /** M̂_A(age) − M̂_B(age) */
  difference: number;
  stdError: number;
  lower: number;
  upper: number;
}

/**
 * Difference of two MCFs (e.g. two shops or engine families) at chosen ages, with a normal-approximation
 * interval: (M̂_A − M̂_B) ± z·√(se_A² + se_B²), treating the two groups as independent samples of units.
 * Uses each curve's own chosen standard error. An interval excluding 0 marks a difference at that age.
 */
export function mcfDifference(a: McfCurve, b: McfCurve, ages: readonly number[], level = 0.95): McfDifferencePoint[] {
  const z = twoSidedZ(level);
  return ages.map((age) => {
    const pa = mcfAt(a, age);
    const pb = mcfAt(b, age);
    const difference = pa.mcf - pb.mcf;
    const stdError = Math.hypot(pa.stdError, pb.stdError);
    return { age, difference, stdError, lower: difference - z * stdError, upper: difference + z * stdError };
  });
}
