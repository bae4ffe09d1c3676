/**
 * The life curves' CPU work — Weibull fits with profile-likelihood intervals, Kaplan–Meier with the log-rank
 * test, the mean cumulative function — as functions of plain data, run on a worker thread (worker-pool.ts) so
 * that a first call after a load (seconds at a million lines) never holds up the requests around it.
 */
import type { KaplanMeierResponse, LifeQuery, McfResponse, WeibullFitSummary, WeibullResponse } from "../../../shared/schemas/analytics-life.js";
import type { LifeUnit, RecurrenceRow } from "../../db/queries/analytics-life.js";
import { compareWeibull, fitWeibull, weibullPlotPoints, type WeibullFit, type WeibullInsufficient } from "../../analytics/weibull.js";
import { extent } from "d3-array";
import { weibullLine } from "../../analytics/weibull-band.js";
import { kaplanMeier, logRankTest } from "../../analytics/kaplan-meier.js";
import { meanCumulativeFunction, mcfSlope } from "../../analytics/mcf.js";

export type LifeTask =
  | { kind: "weibull"; units: LifeUnit[]; q: LifeQuery; cold: Set<string> }
  | { kind: "kaplan-meier"; units: LifeUnit[]; q: LifeQuery; cold: Set<string> }
  | { kind: "mcf"; rows: RecurrenceRow[]; q: LifeQuery; cold: Set<string> };

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

function summary(fit: WeibullFit | WeibullInsufficient, units: number): WeibullFitSummary {
  if (fit.status !== "fitted") return { status: "insufficient", units, failures: fit.failures, reason: fit.reason === "too-few-failures" ? `a Weibull fit needs at least ${fit.minimumFailures} failures` : "the likelihood has no finite maximum" };
  return {
    status: "fitted",
    units,
    failures: fit.failures,
    shape: fit.shape,
    scale: fit.scale,
    b10: fit.b10,
    shapeInterval: fit.shapeInterval,
    scaleInterval: fit.scaleInterval,
    b10Interval: fit.b10Interval,
    logLikelihood: fit.logLikelihood,
  };
}

const thin = <T,>(rows: T[], max: number): T[] => (rows.length <= max ? rows : rows.filter((_, i) => i % Math.ceil(rows.length / max) === 0 || i === rows.length - 1));


export function weibullAnswer(units: LifeUnit[], q: LifeQuery, cold: Set<string>): WeibullResponse {
  const groups = split<LifeUnit>(units, q, cold);
  const body: WeibullResponse = {
    component: q.component,
    method: "Maximum likelihood with right censoring (survivors censored at their last valid reading) and delayed entry; 90 % profile-likelihood-ratio intervals; plot points by Johnson's adjusted ranks with Bernard's approximation; band: 90 % Fisher-matrix band on the plot scale.",
    groups: groups.map((g) => {
      const fit = fitWeibull(g.items);
      const points = g.items.length ? weibullPlotPoints(g.items) : [];
      const [shortest, longest] = extent(g.items, (u) => u.time); // not Math.min(...): a million arguments overflow the stack
      return {
        label: g.label,
        fit: summary(fit, g.items.length),
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
    method: "Kaplan–Meier product-limit estimate; risk set counts units with entry < t ≤ exit; Greenwood variance, 95 % log-transformed limits; log-rank test between the groups.",
    groups: groups.map((g) => {
      const curve = g.items.length ? kaplanMeier(g.items) : null;
      return {
        label: g.label,
        units: g.items.length,
        failures: g.items.filter((u) => u.event === 1).length,
        steps: thin(curve?.steps ?? [], 500).map((s) => ({ time: s.time, atRisk: s.atRisk, survival: s.survival, lower: s.lower, upper: s.upper })),
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

export default function runLifeTask(t: LifeTask): WeibullResponse | KaplanMeierResponse | McfResponse {
  if (t.kind === "weibull") return weibullAnswer(t.units, t.q, t.cold);
  if (t.kind === "kaplan-meier") return kaplanMeierAnswer(t.units, t.q, t.cold);
  return mcfAnswer(t.rows, t.q, t.cold);
}
