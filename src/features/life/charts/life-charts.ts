import * as Plot from "@observablehq/plot";
import type { Palette } from "@/lib/palette";
import type { CostMcfResponse, KaplanMeierResponse, McfResponse, WeibullResponse } from "@shared/schemas/analytics-life";
import type { Format } from "@shared/format";

/** Weibull plot scale: y = ln(−ln(1 − F)), so a Weibull distribution is a straight line against log time. */
export const weibullY = (F: number) => Math.log(-Math.log(1 - F));
const fromWeibullY = (y: number) => 1 - Math.exp(-Math.exp(y));
const PROBABILITY_TICKS = [0.001, 0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.3, 0.5, 0.632, 0.8, 0.9, 0.99];

/** Probability plot: each failure at its estimated share failed, the fitted line and its 90 % confidence band, one colour per group. */
export function weibullChart(d: WeibullResponse, c: Palette, f: Format): Plot.PlotOptions {
  const points = d.groups.flatMap((g) => g.points.filter((p) => p.medianRank > 0 && p.medianRank < 1 && p.time > 0).map((p) => ({ ...p, group: g.label, y: weibullY(p.medianRank) })));
  const line = d.groups.flatMap((g) =>
    g.line.filter((p) => p.F > 0 && p.F < 1 && p.time > 0).map((p) => ({ group: g.label, time: p.time, y: weibullY(p.F), lo: weibullY(Math.min(Math.max(p.lower, 1e-6), 1 - 1e-9)), hi: weibullY(Math.min(Math.max(p.upper, 1e-6), 1 - 1e-9)) })),
  );
  // the axes follow the failures; the fitted line and band are clipped to them
  const ys = points.map((p) => p.y);
  const lo = Math.min(...ys, weibullY(0.01)) - 0.3;
  const hi = Math.max(...ys, weibullY(0.5)) + 0.3;
  const times = points.map((p) => p.time);
  const xDomain: [number, number] = times.length ? [Math.min(...times) / 1.5, Math.max(...times) * 1.5] : [1, 10_000];
  return {
    height: 360,
    marginLeft: 56,
    x: { type: "log", label: "Engine hours from fitting to failure (log scale)", grid: true, domain: xDomain },
    y: { label: "Share failed (Weibull scale)", domain: [lo, hi], ticks: PROBABILITY_TICKS.map(weibullY).filter((t) => t >= lo && t <= hi), tickFormat: (t: number) => f.percent(fromWeibullY(t)), grid: true },
    color: { domain: d.groups.map((g) => g.label), range: c.series.slice(0, d.groups.length), legend: true },
    marks: [
      Plot.areaY(line, { x: "time", y1: "lo", y2: "hi", fill: "group", fillOpacity: 0.15, clip: true }),
      Plot.lineY(line, { x: "time", y: "y", stroke: "group", strokeWidth: 2, clip: true }),
      Plot.dot(points, { x: "time", y: "y", stroke: "group", r: 2.5 }),
      Plot.tip(points, Plot.pointer({ x: "time", y: "y", title: (p: (typeof points)[number]) => `${p.group}\nfailure at ${f.quantity("hours", p.time)} h\nestimated share failed ${f.percent(p.medianRank)}` })),
    ],
  };
}

/** Kaplan–Meier survival steps with their 95 % limits as a band. */
export function kaplanMeierChart(d: KaplanMeierResponse, c: Palette, f: Format): Plot.PlotOptions {
  const steps = d.groups.flatMap((g) => [{ group: g.label, time: 0, survival: 1, lower: 1, upper: 1, atRisk: g.units }, ...g.steps.map((s) => ({ group: g.label, ...s, lower: s.lower ?? s.survival, upper: s.upper ?? s.survival }))]);
  return {
    height: 320,
    marginLeft: 56,
    x: { label: "Engine hours since fitting", grid: true },
    y: { label: "Share still working (%)", domain: [0, 1], tickFormat: (v: number) => f.count(v * 100), grid: true },
    color: { domain: d.groups.map((g) => g.label), range: c.series.slice(0, d.groups.length), legend: true },
    marks: [
      Plot.areaY(steps, { x: "time", y1: "lower", y2: "upper", fill: "group", fillOpacity: 0.15, curve: "step-after" }),
      Plot.lineY(steps, { x: "time", y: "survival", stroke: "group", strokeWidth: 2, curve: "step-after" }),
      Plot.tip(steps, Plot.pointerX({ x: "time", y: "survival", title: (s: (typeof steps)[number]) => `${s.group}\n${f.quantity("hours", s.time)} h: ${f.percent(s.survival)} working (95 % ${f.percent(s.lower)}–${f.percent(s.upper)})\n${f.count(s.atRisk)} at risk` })),
    ],
  };
}

/** Mean cumulative function of repeat repairs with its 95 % limits. */
export function mcfChart(d: McfResponse, c: Palette, f: Format): Plot.PlotOptions {
  const steps = d.groups.flatMap((g) => [{ group: g.label, age: 0, mcf: 0, lower: 0, upper: 0, atRisk: g.machines }, ...g.steps.map((s) => ({ group: g.label, ...s }))]);
  return {
    height: 320,
    marginLeft: 56,
    x: { label: "Engine hours since delivery", grid: true },
    y: { label: "Repairs per machine (mean cumulative)", grid: true, zero: true },
    color: { domain: d.groups.map((g) => g.label), range: c.series.slice(0, d.groups.length), legend: true },
    marks: [
      Plot.areaY(steps, { x: "age", y1: "lower", y2: "upper", fill: "group", fillOpacity: 0.15, curve: "step-after" }),
      Plot.lineY(steps, { x: "age", y: "mcf", stroke: "group", strokeWidth: 2, curve: "step-after" }),
      Plot.tip(steps, Plot.pointerX({ x: "age", y: "mcf", title: (s: (typeof steps)[number]) => `${s.group}\n${f.quantity("hours", s.age)} h: ${f.quantity("ratio", s.mcf)} repairs per machine (95 % ${f.quantity("ratio", s.lower)}–${f.quantity("ratio", s.upper)})\n${f.count(s.atRisk)} machines observed` })),
    ],
  };
}

/** Mean cumulative repair cost per machine (Nelson's cost MCF) with its 95 % limits. */
export function costMcfChart(d: CostMcfResponse, c: Palette, f: Format): Plot.PlotOptions {
  const steps = d.groups.flatMap((g) => [{ group: g.label, age: 0, mcf: 0, lower: 0, upper: 0, atRisk: g.machines }, ...g.steps.map((s) => ({ group: g.label, ...s }))]);
  return {
    height: 320,
    marginLeft: 64,
    x: { label: "Engine hours since delivery", grid: true },
    y: { label: "Repair cost per machine (mean cumulative)", grid: true, zero: true },
    color: { domain: d.groups.map((g) => g.label), range: c.series.slice(0, d.groups.length), legend: true },
    marks: [
      Plot.areaY(steps, { x: "age", y1: "lower", y2: "upper", fill: "group", fillOpacity: 0.15, curve: "step-after" }),
      Plot.lineY(steps, { x: "age", y: "mcf", stroke: "group", strokeWidth: 2, curve: "step-after" }),
      Plot.tip(steps, Plot.pointerX({ x: "age", y: "mcf", title: (s: (typeof steps)[number]) => `${s.group}\n${f.quantity("hours", s.age)} h: ${f.moneyWhole(s.mcf)} per machine (95 % ${f.moneyWhole(s.lower)}–${f.moneyWhole(s.upper)})\n${f.count(s.atRisk)} machines observed` })),
    ],
  };
}
