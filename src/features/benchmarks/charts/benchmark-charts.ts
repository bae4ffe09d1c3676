import * as Plot from "@observablehq/plot";
import type { Palette } from "@/lib/palette";
import { MINIMUM_LINES, type Funnel, type FunnelLimits, type FunnelStatus, type Trend } from "@shared/schemas/benchmarks";
import type { FixRow } from "@shared/schemas/benchmark-details";
import { spreadLabels } from "./label-spread";

/** Colour of a funnel status; where a higher rate is better (first-time fix) above the funnel is good. */
export const statusColour = (s: FunnelStatus, c: Palette, higherIsBetter = false): string => {
  const good = higherIsBetter ? s.startsWith("above") : s.startsWith("below");
  const bad998 = higherIsBetter ? s === "below_998" : s === "above_998";
  return s === "within" ? c.accent : s === "not_rated" ? c.muted : good ? c.ok : bad998 ? c.alert : c.ochre;
};

/** A short mark label: the shop code ("S5") or a technician's id. */
export const shortLabel = (p: { label: string }): string => p.label.split(" ")[0]!;

/** One point of a funnel plot: a rate at a volume (a shop's own, or a band of volumes where only that is known). */
export interface FunnelChartPoint {
  key: string;
  label: string;
  x: number;
  band: { from: number; to: number } | null;
  rate: number;
  status: FunnelStatus;
  words: string;
  /** "263 lines", "42 complaints" */
  volume: string;
}

/** What a funnel plot needs: the points, the group rate and the limits around it, and what its axes measure. */
export interface FunnelChartProps {
  points: readonly FunnelChartPoint[];
  groupRate: number | null;
  limits: FunnelLimits;
  xLabel: string;
  yLabel: string;
  higherIsBetter?: boolean;
}

const HEIGHT = 380;
const MARGIN_TOP = 20;
const MARGIN_BOTTOM = 46;
/** The least vertical distance between two labels, in pixels (the line box of a 12 px label and a little air). */
const LABEL_GAP_PX = 16;

/**
 * Funnel plot: a rate against volume, the group rate as a rule, the 95 % and 99.8 % limits as bands around it,
 * each point a dot coloured by where it falls, its label spread apart so that near points' labels do not pile up (a
 * thin leader joins a moved label to its dot).
 */
export function funnelChart(d: FunnelChartProps, c: Palette): Plot.PlotOptions {
  const last = d.limits[d.limits.length - 1];
  const bands = d.points.filter((p) => p.band !== null);
  const named = d.points.filter((p) => p.band === null);
  const top = Math.max(...d.points.map((p) => p.rate), ...d.limits.map((l) => l.upper998), 0.1);
  const yMax = Math.min(100, top * 108);
  // high rates (first-time fix) are drawn from a little below the lowest rate or limit, low ones from zero
  const lowest = Math.min(...d.points.map((p) => p.rate), ...d.limits.map((l) => l.lower998), 1);
  const yMin = lowest > 0.3 ? Math.max(0, Math.floor(lowest * 100 - 5)) : 0;
  const xMax = Math.max(...d.points.map((p) => p.band?.to ?? p.x), ...d.limits.map((l) => l.n), 1);
  const gap = (LABEL_GAP_PX * (yMax - yMin)) / (HEIGHT - MARGIN_TOP - MARGIN_BOTTOM);
  const labelYs = spreadLabels(named.map((p) => ({ x: p.x, y: p.rate * 100 })), gap, xMax * 0.15, [yMin + gap / 2, yMax - gap / 2]);
  const labels = named.map((p, i) => ({ ...p, y: p.rate * 100, labelY: labelYs[i]! }));
  const moved = labels.filter((l) => Math.abs(l.labelY - l.y) > gap * 0.25);
  const colour = (p: FunnelChartPoint) => statusColour(p.status, c, d.higherIsBetter);
  return {
    height: HEIGHT,
    marginTop: MARGIN_TOP,
    marginLeft: 56,
    marginRight: 64,
    marginBottom: MARGIN_BOTTOM,
    x: { label: d.xLabel, grid: true, zero: true },
    y: { label: d.yLabel, grid: true, domain: [yMin, yMax] },
    marks: [
      Plot.areaY(d.limits, { x: "n", y1: (l) => l.lower998 * 100, y2: (l) => l.upper998 * 100, fill: c.accentSoft, fillOpacity: 0.55, curve: "monotone-x" }),
      Plot.areaY(d.limits, { x: "n", y1: (l) => l.lower95 * 100, y2: (l) => l.upper95 * 100, fill: c.accentSoft, curve: "monotone-x" }),
      Plot.line(d.limits, { x: "n", y: (l) => l.upper998 * 100, stroke: c.alert, strokeDasharray: "5,3", strokeOpacity: 0.8, curve: "monotone-x" }),
      Plot.line(d.limits, { x: "n", y: (l) => l.lower998 * 100, stroke: c.alert, strokeDasharray: "5,3", strokeOpacity: 0.8, curve: "monotone-x" }),
      Plot.line(d.limits, { x: "n", y: (l) => l.upper95 * 100, stroke: c.ochre, curve: "monotone-x" }),
      Plot.line(d.limits, { x: "n", y: (l) => l.lower95 * 100, stroke: c.ochre, curve: "monotone-x" }),
      ...(d.groupRate === null ? [] : [Plot.ruleY([d.groupRate * 100], { stroke: c.slate, strokeWidth: 1.5 })]),
      ...(last
        ? [
            Plot.text([last], { x: "n", y: (l) => l.upper998 * 100, text: () => "99.8 %", dx: 6, textAnchor: "start", fill: c.alert }),
            Plot.text([last], { x: "n", y: (l) => l.upper95 * 100, text: () => "95 %", dx: 6, textAnchor: "start", fill: c.ochre }),
            ...(d.groupRate === null ? [] : [Plot.text([last], { x: "n", y: () => d.groupRate! * 100, text: () => "group", dx: 6, textAnchor: "start", fill: c.slate })]),
          ]
        : []),
      // a point whose volume is only known as a band is drawn as a bar across the band
      Plot.link(bands, { x1: (p: FunnelChartPoint) => p.band!.from, x2: (p: FunnelChartPoint) => p.band!.to, y1: (p: FunnelChartPoint) => p.rate * 100, y2: (p: FunnelChartPoint) => p.rate * 100, stroke: colour, strokeWidth: 4, strokeOpacity: 0.7, strokeLinecap: "round" }),
      Plot.text(bands, { x: (p: FunnelChartPoint) => p.band!.to, y: (p: FunnelChartPoint) => p.rate * 100, text: shortLabel, dx: 6, textAnchor: "start", fill: c.ink, fontWeight: 600 }),
      Plot.link(moved, { x1: "x", y1: "y", x2: "x", y2: "labelY", stroke: c.muted, strokeWidth: 0.8 }),
      Plot.dot(named, { x: "x", y: (p: FunnelChartPoint) => p.rate * 100, r: 6, fill: colour, stroke: c.card, strokeWidth: 1.5 }),
      Plot.text(labels, { x: "x", y: "labelY", text: shortLabel, dx: 9, textAnchor: "start", fill: c.ink, fontWeight: 600, stroke: c.card, strokeWidth: 3, paintOrder: "stroke" }),
      Plot.tip(
        d.points,
        Plot.pointer({
          x: "x",
          y: (p: FunnelChartPoint) => p.rate * 100,
          title: (p: FunnelChartPoint) => `${p.label}\n${p.volume}\n${p.words}`,
        }),
      ),
    ],
  };
}

/** The comeback funnel's points and axes. */
export function comebackFunnel(d: Funnel, count: (n: number) => string): FunnelChartProps {
  return {
    points: d.points.map((p) => ({ key: p.key, label: p.label, x: p.x, band: p.band, rate: p.rate, status: p.status, words: p.words, volume: p.lines === null ? p.volumeBand : `${count(p.lines)} lines` })),
    groupRate: d.groupRate,
    limits: d.limits,
    xLabel: "Qualifying repair lines (volume) →",
    yLabel: "↑ Comeback rate (%)",
  };
}

/** The first-time-fix funnel of some rows (shops, or one shop's technicians): rows below 30 complaints are not plotted. */
export function fixFunnel(rows: readonly FixRow[], d: { groupRate: number | null; limits: FunnelLimits }, count: (n: number) => string): FunnelChartProps {
  const points = rows
    .filter((r) => r.funnel.complaints >= MINIMUM_LINES && r.firstTimeFix.value !== null)
    .map((r) => ({ key: r.key, label: r.label, x: r.funnel.complaints, band: null, rate: r.firstTimeFix.value!, status: r.status, words: r.words, volume: `${count(r.funnel.complaints)} complaints` }));
  // the limits span the shops' volumes; a shop's technicians see them only as far as their own
  const reach = Math.max(MINIMUM_LINES * 2, ...points.map((p) => p.x)) * 1.15;
  const inReach = d.limits.filter((l) => l.n <= reach);
  return {
    points,
    groupRate: d.groupRate,
    limits: inReach.length >= 2 ? inReach : d.limits,
    xLabel: "Complaints (volume) →",
    yLabel: "↑ First-time fix (%)",
    higherIsBetter: true,
  };
}

interface TrendRow {
  label: string;
  date: Date;
  rate: number;
}

/** Rolling 12-month comeback rate by month, one line per shop, the group dashed. */
export function trendChart(d: Trend, c: Palette, pct: (x: number) => string): Plot.PlotOptions {
  const rows: TrendRow[] = d.series.flatMap((s) =>
    s.points.filter((p) => p.rolling.value !== null).map((p) => ({ label: s.label, date: new Date(`${p.month}-01T00:00:00Z`), rate: p.rolling.value! * 100 })),
  );
  const group = d.group.filter((p) => p.rolling.value !== null).map((p) => ({ label: "Group", date: new Date(`${p.month}-01T00:00:00Z`), rate: p.rolling.value! * 100 }));
  const named = d.series.filter((s) => !s.peer).map((s) => s.label);
  const peers = d.series.filter((s) => s.peer).map((s) => s.label);
  const domain = [...named, ...peers];
  const range = [...named.map((_, i) => c.series[i % c.series.length]!), ...peers.map(() => c.line)];
  const ends = d.series.map((s) => rows.filter((r) => r.label === s.label).at(-1)).filter((r): r is TrendRow => r !== undefined);
  return {
    height: 320,
    marginLeft: 56,
    marginRight: 40,
    x: { type: "utc", label: null },
    y: { label: "↑ Comeback rate, 12 months to the month (%)", grid: true, zero: true },
    color: { domain, range, legend: named.length > 1 },
    marks: [
      Plot.lineY(rows.filter((r) => peers.includes(r.label)), { x: "date", y: "rate", z: "label", stroke: "label", strokeWidth: 1.5 }),
      Plot.lineY(rows.filter((r) => named.includes(r.label)), { x: "date", y: "rate", z: "label", stroke: "label", strokeWidth: named.length === 1 ? 3 : 2 }),
      Plot.lineY(group, { x: "date", y: "rate", stroke: c.ink, strokeDasharray: "6,4", strokeWidth: 1.5 }),
      // with one named shop (a manager's view) its line is labelled; several named shops use the legend
      ...(named.length === 1 ? [Plot.text(ends.filter((r) => r.label === named[0]), { x: "date", y: "rate", text: (r: TrendRow) => r.label.split(" ")[0], dx: 6, textAnchor: "start", fill: c.ink, fontWeight: 600 })] : []),
      Plot.tip(rows, Plot.pointer({ x: "date", y: "rate", title: (r: TrendRow) => `${r.label}\n12 months to ${r.date.toISOString().slice(0, 7)}: ${pct(r.rate / 100)}` })),
    ],
  };
}
