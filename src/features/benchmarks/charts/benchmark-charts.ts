import * as Plot from "@observablehq/plot";
import type { Palette } from "@/lib/palette";
import type { Funnel, FunnelPoint, FunnelStatus, Trend } from "@shared/schemas/benchmarks";

export const statusColour = (s: FunnelStatus, c: Palette): string =>
  s === "above_998" ? c.alert : s === "above_95" ? c.ochre : s === "below_95" || s === "below_998" ? c.ok : s === "within" ? c.accent : c.muted;

/** A short mark label: the shop code ("S5") or the peer's letter ("B"). */
export const shortLabel = (p: { label: string; peer: boolean }): string => (p.peer ? p.label.replace(/^Peer /, "") : p.label.split(" ")[0]!);

const pct = (x: number) => `${(100 * x).toFixed(1)} %`;

/**
 * Funnel plot: comeback rate against volume, the group rate as a rule, the 95 % and 99.8 % limits as bands
 * around it, each shop a dot coloured by where it falls.
 */
export function funnelChart(d: Funnel, c: Palette): Plot.PlotOptions {
  const last = d.limits[d.limits.length - 1];
  const peers = d.points.filter((p) => p.band !== null);
  const named = d.points.filter((p) => p.band === null);
  const yMax = Math.max(...d.points.map((p) => p.rate), ...(d.limits.length ? [d.limits[0]!.upper998] : [0.1])) * 1.08;
  return {
    height: 380,
    marginLeft: 56,
    marginRight: 64,
    marginBottom: 44,
    x: { label: "Qualifying repair lines (volume) →", grid: true, zero: true },
    y: { label: "↑ Comeback rate (%)", grid: true, domain: [0, yMax * 100] },
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
      // a peer's volume is only known as a band, so it is drawn as a bar across the band
      Plot.link(peers, { x1: (p: FunnelPoint) => p.band!.from, x2: (p: FunnelPoint) => p.band!.to, y1: (p: FunnelPoint) => p.rate * 100, y2: (p: FunnelPoint) => p.rate * 100, stroke: (p: FunnelPoint) => statusColour(p.status, c), strokeWidth: 4, strokeOpacity: 0.7, strokeLinecap: "round" }),
      Plot.text(peers, { x: (p: FunnelPoint) => p.band!.to, y: (p: FunnelPoint) => p.rate * 100, text: shortLabel, dx: 6, textAnchor: "start", fill: c.ink, fontWeight: 600 }),
      Plot.dot(named, { x: "x", y: (p: FunnelPoint) => p.rate * 100, r: 6, fill: (p: FunnelPoint) => statusColour(p.status, c), stroke: c.card, strokeWidth: 1.5 }),
      Plot.text(named, { x: "x", y: (p: FunnelPoint) => p.rate * 100, text: shortLabel, dx: 9, textAnchor: "start", fill: c.ink, fontWeight: 600 }),
      Plot.tip(
        d.points,
        Plot.pointer({
          x: "x",
          y: (p: FunnelPoint) => p.rate * 100,
          title: (p: FunnelPoint) => `${p.label}\n${p.lines === null ? p.volumeBand : `${p.lines} lines`}\n${pct(p.rate)}: ${p.words}`,
        }),
      ),
    ],
  };
}

interface TrendRow {
  label: string;
  date: Date;
  rate: number;
}

/** Rolling 12-month comeback rate by month, one line per shop, the group dashed. */
export function trendChart(d: Trend, c: Palette): Plot.PlotOptions {
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
      Plot.tip(rows, Plot.pointer({ x: "date", y: "rate", title: (r: TrendRow) => `${r.label}\n12 months to ${r.date.toISOString().slice(0, 7)}: ${r.rate.toFixed(1)} %` })),
    ],
  };
}
