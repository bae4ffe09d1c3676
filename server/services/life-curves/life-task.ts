/**
 * The life curves' CPU work — Weibull fits with profile-likelihood intervals, Kaplan–Meier with the log-rank
 * test, the mean cumulative function — as functions of plain data, run on a worker thread (worker-pool.ts) so
 * that a first call after a load (seconds at a million lines) never holds up the requests around it.
 */
import type { CostMcfResponse, KaplanMeierResponse, LifeQuery, McfResponse, WeibullFitSummary, WeibullResponse } from "../../../shared/schemas/analytics-life.js";
import type { CostRecurrenceRow, LifeUnit, RecurrenceRow } from "../../db/queries/analytics-life.js";
import { compareWeibull, fitWeibull, weibullPlotPoints, type WeibullFit, type WeibullInsufficient } from "../../analytics/weibull.js";
import { extent } from "d3-array";
import { weibullLine } from "../../analytics/weibull-band.js";
import { kaplanMeier, kaplanMeierQuantile, logRankTest } from "../../analytics/kaplan-meier.js";
import { costMeanCumulativeFunction, meanCumulativeFunction, mcfSlope } from "../../analytics/mcf.js";
import { weibullBLife } from "../../analytics/b-life.js";

export type LifeTask =
  | { kind: "weibull"; units: LifeUnit[]; q: LifeQuery; cold: Set<string> }
  | { kind: "kaplan-meier"; units: LifeUnit[]; q: LifeQuery; cold: Set<string> }
  | { kind: "mcf"; rows: RecurrenceRow[]; q: LifeQuery; cold: Set<string> }
  | { kind: "cost-mcf"; rows: CostRecurrenceRow[]; q: LifeQuery; cold: Set<string> };

type Grouped<T> = { label: string; items: T[] }[];

/** Splits units into group A (attribute = value) and B (= other, or everything else); one group without compareBy. */
function split<T extends { lot: string; engineFamily: string; shopCode: string }>(items: T[], q: LifeQuery, cold: Set<string>): Grouped<T> {
  if (!q.compareBy || !q.compareValue) return [{ label: "All units", items }];
  const attr = (u: T): string =>
    q.compareBy === "lot" ? u.lot : q.compareBy === "engineFamily" ? u.engineFamily : q.compareBy === "shop" ? u.shopCode : cold.has(u.shopCode) ? "cold" : "mild";
  const a = items.filter((u) => attr(u) === q.compareValue);
  const b = items.filter((u) => (q.compareOther ? attr(u) === q.compareOther : attr(u) !== q.compareValue));
  const names: Record<string, string> = { lot: "lot", engineFamily: "engine family", shop: "shop", climate: "shops" };
  return [
    { label: `${names[q.compareBy]} ${q.compareValue}`, items: a },
    { label: q.compareOther ? `${names[q.compareBy]} ${q.compareOther}` : `all other ${names[q.compareBy] === "shops" ? "shops" : names[q.compareBy] + "s"}`, items: b },
  ];
}

function summary(fit: WeibullFit | WeibullInsufficient, units: LifeUnit[], percent: number): WeibullFitSummary {
  if (fit.status !== "fitted") return { status: "insufficient", units: units.length, failures: fit.failures, reason: fit.reason === "too-few-failures" ? `a Weibull fit needs at least ${fit.minimumFailures} failures` : "the likelihood has no finite maximum" };
  return {
    status: "fitted",
    units: units.length,
    failures: fit.failures,
    shape: fit.shape,
    scale: fit.scale,
    b10: fit.b10,
    shapeInterval: fit.shapeInterval,
    scaleInterval: fit.scaleInterval,
    b10Interval: fit.b10Interval,
    // B10 is the fit's own (same interval, tests/unit/analytics/b-life.test.ts); any other p costs one more LR search
    bLife:
      percent === 10
        ? { percent, estimate: fit.b10, lower: fit.b10Interval?.lower ?? null, upper: fit.b10Interval?.upper ?? null, level: fit.b10Interval?.level ?? 0.9 }
        : (() => {
            const b = weibullBLife(units, fit, percent / 100);
            return { percent, estimate: b.estimate, lower: b.lower, upper: b.upper, level: b.level };
          })(),
    logLikelihood: fit.logLikelihood,
  };
}

const thin = <T,>(rows: T[], max: number): T[] => (rows.length <= max ? rows : rows.filter((_, i) => i % Math.ceil(rows.length / max) === 0 || i === rows.length - 1));


export function weibullAnswer(units: LifeUnit[], q: LifeQuery, cold: Set<string>): WeibullResponse {
  const groups = split<LifeUnit>(units, q, cold);
  const body: WeibullResponse = {
    component: q.component,
    method: "Maximum likelihood with right censoring (survivors censored at their last valid reading) and delayed entry; 90 % profile-likelihood-ratio intervals; plot points by Johnson's adjusted ranks with Bernard's approximation; band: the 90 % confidence band of the fit (from the fit's covariance, on the plot scale).",
    groups: groups.map((g) => {
      const fit = fitWeibull(g.items);
      const points = g.items.length ? weibullPlotPoints(g.items) : [];
      const [shortest, longest] = extent(g.items, (u) => u.time); // not Math.min(...): a million arguments overflow the stack
      return {
        label: g.label,
        fit: summary(fit, g.items, q.bLife),
        points: thin(points, 400).map((p) => ({ time: p.time, medianRank: p.medianRank })),
        line: fit.status === "fitted" && shortest !== undefined && longest !== undefined ? weibullLine(fit, Math.max(shortest, 1), longest * 1.5) : [],
      };
    }),
    comparison: null,
  };
  if (groups.length === 2) {
    const cmp = compareWeibull(groups[0].items, groups[1].items);
    if (cmp.status === "compared") {
      body.comparison = {
        scaleRatio: cmp.scaleRatio,
        hazardRatio: cmp.hazardRatio,
        commonShape: cmp.commonShape.shape,
        sameDistribution: cmp.sameDistribution,
        sameShape: cmp.sameShape,
      };
    }
  }
  return body;
}

export function kaplanMeierAnswer(units: LifeUnit[], q: LifeQuery, cold: Set<string>): KaplanMeierResponse {
  const groups = split<LifeUnit>(units, q, cold);
  let logRank: KaplanMeierResponse["logRank"] = null;
  if (groups.length === 2 && groups[0].items.length && groups[1].items.length) {
    const t = logRankTest(groups[0].items, groups[1].items);
    logRank = { statistic: t.statistic, pValue: t.pValue };
  }
  const body: KaplanMeierResponse = {
    component: q.component,
    method: "Kaplan–Meier product-limit estimate; risk set counts units with entry < t ≤ exit; Greenwood variance, 95 % log-transformed limits; log-rank test between the groups. B-life read off the curve as R survival's quantile.survfit does: the midpoint of a flat stretch sitting exactly at the level, limits where the bands cross it, “not reached” when a curve or band never gets there.",
    groups: groups.map((g) => {
      const curve = g.items.length ? kaplanMeier(g.items) : null;
      const b = curve ? kaplanMeierQuantile(curve, q.bLife / 100) : null;
      return {
        label: g.label,
        units: g.items.length,
        failures: g.items.filter((u) => u.event === 1).length,
        steps: thin(curve?.steps ?? [], 500).map((s) => ({ time: s.time, atRisk: s.atRisk, survival: s.survival, lower: s.lower, upper: s.upper })),
        bLife: { percent: q.bLife, estimate: b?.estimate ?? null, lower: b?.lower ?? null, upper: b?.upper ?? null, level: curve?.level ?? 0.95 },
      };
    }),
    logRank,
  };
  return body;
}

export function mcfAnswer(rows: RecurrenceRow[], q: LifeQuery, cold: Set<string>): McfResponse {
  const groups = split<RecurrenceRow>(rows, q, cold);
  const body: McfResponse = {
    component: q.component,
    method: "Mean cumulative function (Nelson): M(t) = Σ repairs at tⱼ ÷ machines under observation at tⱼ, ages in engine hours since delivery; Lawless–Nadeau variance, 95 % limits; slope = repairs per 1,000 h over the observed range.",
    groups: groups.map((g) => {
      const units = g.items.map((r) => ({ id: String(r.machineKey), eventAges: r.ages, endAge: r.endAge, startAge: r.startAge }));
      const curve = units.length ? meanCumulativeFunction(units) : null;
      return {
        label: g.label,
        machines: g.items.length,
        repairs: g.items.reduce((s, r) => s + r.ages.length, 0),
        slopePerThousandHours: curve ? mcfSlope(curve, 0, Math.min(curve.lastAge, 6000)) : null,
        steps: thin(curve?.steps ?? [], 500).map((s) => ({ age: s.age, mcf: s.mcf, lower: s.lower, upper: s.upper, atRisk: s.atRisk })),
      };
    }),
  };
  return body;
}

export function costMcfAnswer(rows: CostRecurrenceRow[], q: LifeQuery, cold: Set<string>): CostMcfResponse {
  const groups = split<CostRecurrenceRow>(rows, q, cold);
  return {
    component: q.component,
    currency: "the exports' currency",
    method: "Cost mean cumulative function (Nelson): M(t) = Σ parts + labour cost of the repairs at tⱼ ÷ machines under observation at tⱼ, ages in engine hours since delivery; Nelson's robust variance (no independence assumed between a machine's repairs), 95 % limits; slope = cost per machine per 1,000 h over the observed range.",
    groups: groups.map((g) => {
      const units = g.items.map((r) => ({ id: String(r.machineKey), repairs: r.ages.map((age, i) => ({ age, cost: r.costs[i] ?? 0 })), endAge: r.endAge, startAge: r.startAge }));
      const curve = units.length ? costMeanCumulativeFunction(units) : null;
      const to = curve ? Math.min(curve.lastAge, 6000) : 0;
      const last = curve?.steps.filter((s) => s.age <= to).at(-1);
      return {
        label: g.label,
        machines: g.items.length,
        repairs: curve?.repairs ?? 0,
        totalCost: curve?.totalCost ?? 0,
        slopePerThousandHours: curve && to > 0 ? (1000 * (last?.mcf ?? 0)) / to : null,
        steps: thin(curve?.steps ?? [], 500).map((s) => ({ age: s.age, mcf: s.mcf, lower: s.lower, upper: s.upper, atRisk: s.atRisk })),
      };
    }),
  };
}

export default function runLifeTask(t: LifeTask): WeibullResponse | KaplanMeierResponse | McfResponse | CostMcfResponse {
  if (t.kind === "weibull") return weibullAnswer(t.units, t.q, t.cold);
  if (t.kind === "kaplan-meier") return kaplanMeierAnswer(t.units, t.q, t.cold);
  if (t.kind === "cost-mcf") return costMcfAnswer(t.rows, t.q, t.cold);
  return mcfAnswer(t.rows, t.q, t.cold);
}
