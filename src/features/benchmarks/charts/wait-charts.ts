import * as Plot from "@observablehq/plot";
import type { Palette } from "@/lib/palette";
import { WAIT_BANDS, type Waits } from "@shared/schemas/benchmark-details";

interface BandRow {
  shop: string;
  band: string;
  share: number;
}

/** Part lines of each shop shared out across the wait bands: one stacked bar per shop (codes only, so labels never crowd). */
export function waitBandsChart(d: Waits, c: Palette, pct: (x: number) => string): Plot.PlotOptions {
  const shown = [...(d.group ? [d.group] : []), ...d.shops];
  const rows: BandRow[] = shown.flatMap((s) => s.bands.map((b) => ({ shop: s.key === "group" ? "Group" : s.key, band: b.label, share: b.share * 100 })));
  const bands = WAIT_BANDS.map((b) => b.label);
  return {
    height: 60 + 28 * shown.length,
    marginLeft: 56,
    x: { label: "Share of part lines (%) →", domain: [0, 100], grid: true },
    y: { label: null, domain: shown.map((s) => (s.key === "group" ? "Group" : s.key)) },
    color: { domain: bands, range: [c.accentSoft, c.ochre, c.alert, c.ink], legend: true },
    marks: [
      Plot.barX(rows, { x: "share", y: "shop", fill: "band", order: bands, title: (r: BandRow) => `${r.shop}: ${pct(r.share / 100)} waited ${r.band}` }),
      Plot.ruleX([0]),
    ],
  };
}

interface MonthRow {
  date: Date;
  value: number;
  series: string;
}

/**
 * Share of the group's part lines waiting over 7 and over 14 days, by month of order, with the stretches that stand
 * out shaded and named above the plot; the time axis picks its own spaced ticks.
 */
export function waitTrendChart(d: Waits, c: Palette, pct: (x: number) => string): Plot.PlotOptions {
  const date = (m: string) => new Date(`${m}-01T00:00:00Z`);
  const end = (m: string) => {
    const x = date(m);
    return new Date(Date.UTC(x.getUTCFullYear(), x.getUTCMonth() + 1, 1));
  };
  const rows: MonthRow[] = d.months.flatMap((m) => [
    ...(m.over7 === null ? [] : [{ date: date(m.month), value: m.over7 * 100, series: "over 7 days" }]),
    ...(m.over14 === null ? [] : [{ date: date(m.month), value: m.over14 * 100, series: "over 14 days" }]),
  ]);
  const top = Math.max(5, ...rows.map((r) => r.value)) * 1.15;
  return {
    height: 300,
    marginLeft: 56,
    marginTop: 24,
    x: { type: "utc", label: null },
    y: { label: "↑ Part lines waiting (%)", grid: true, domain: [0, top] },
    color: { domain: ["over 7 days", "over 14 days"], range: [c.ochre, c.alert], legend: true },
    marks: [
      Plot.rectX(d.stretches, { x1: (s) => date(s.from), x2: (s) => end(s.to), y1: 0, y2: top, fill: c.alert, fillOpacity: 0.08 }),
      // only the longest stretch is named on the plot; every stretch is named in words below it
      Plot.text(d.stretches.filter((s) => s.over14 === Math.max(...d.stretches.map((x) => x.over14))), {
        x: (s) => date(s.from), y: top, text: (s) => s.label, dy: -6, textAnchor: "start", fill: c.alert, fontWeight: 600, lineAnchor: "bottom",
      }),
      Plot.lineY(rows, { x: "date", y: "value", stroke: "series", strokeWidth: 1.8 }),
      Plot.ruleY([0]),
      Plot.tip(rows, Plot.pointer({ x: "date", y: "value", title: (r: MonthRow) => `${r.date.toISOString().slice(0, 7)}: ${pct(r.value / 100)} waited ${r.series}` })),
    ],
  };
}
