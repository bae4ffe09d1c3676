import * as Plot from "@observablehq/plot";
import type { Palette } from "@/lib/palette";
import type { ComponentRates, HourBandRates, MonthlyRates, TemperatureBandRates } from "@shared/schemas/analytics-rates";
import { hourBandLabel } from "@shared/bands";
import type { Format } from "@shared/format";

interface BandPoint {
  label: string;
  failures: number;
  exposure: number;
  rate: number | null;
  lower: number | null;
  upper: number | null;
}

/** Bars of a rate per band with its 95 % interval as a whisker, bands in their own order. */
function bandRateChart(points: BandPoint[], c: Palette, f: Format, o: { x: string; y: string; exposure: string; fill: string }): Plot.PlotOptions {
  const shown = points.filter((p) => p.rate !== null);
  return {
    height: 300,
    marginLeft: 56,
    marginBottom: points.length > 5 ? 72 : 48,
    x: { label: o.x, domain: points.map((p) => p.label), tickRotate: points.length > 5 ? -20 : 0, labelOffset: points.length > 5 ? 66 : 40 },
    y: { label: o.y, grid: true, zero: true },
    marks: [
      Plot.barY(shown, { x: "label", y: "rate", fill: o.fill, fillOpacity: 0.85 }),
      Plot.ruleX(shown, { x: "label", y1: "lower", y2: "upper", stroke: c.ink, strokeWidth: 1.5 }),
      Plot.dot(shown, { x: "label", y: "upper", symbol: "times", r: 3, stroke: c.ink }),
      Plot.dot(shown, { x: "label", y: "lower", symbol: "times", r: 3, stroke: c.ink }),
      Plot.tip(
        shown,
        Plot.pointerX({
          x: "label",
          y: "rate",
          title: (p: BandPoint) => `${p.label}\n${f.quantity("rate", p.rate)} (95 % ${f.quantity("rate", p.lower)}–${f.quantity("rate", p.upper)})\n${f.count(p.failures)} ${p.failures === 1 ? "failure" : "failures"} over ${f.count(p.exposure)} ${o.exposure}`,
        }),
      ),
      Plot.ruleY([0]),
    ],
  };
}

export function hourBandChart(d: HourBandRates, c: Palette, f: Format): Plot.PlotOptions {
  return bandRateChart(
    d.rows.map((r) => ({ label: hourBandLabel(r.band), failures: r.failures, exposure: r.engineHours, rate: r.perThousandHours?.rate ?? null, lower: r.perThousandHours?.lower ?? null, upper: r.perThousandHours?.upper ?? null })),
    c,
    f,
    { x: "Engine hours on the meter at the repair", y: "Failures per 1,000 engine hours", exposure: "engine hours", fill: c.series[0] },
  );
}

/** The answer's bands in its unit, coldest first, as the server labelled them. */
export function temperatureBandChart(d: TemperatureBandRates, c: Palette, f: Format): Plot.PlotOptions {
  return bandRateChart(
    d.rows
      .filter((r) => r.band !== "unknown" || r.failures > 0)
      .map((r) => ({ label: r.label, failures: r.failures, exposure: r.machineDays, rate: r.perThousandMachineDays?.rate ?? null, lower: r.perThousandMachineDays?.lower ?? null, upper: r.perThousandMachineDays?.upper ?? null })),
    c,
    f,
    { x: `Daily minimum temperature at the home shop (°${d.unit})`, y: "Failures per 1,000 machine-days", exposure: "machine-days", fill: c.series[2] },
  );
}

/** Pareto: each component's share of failures as bars, the cumulative share as a line, both in %. */
export function paretoChart(d: ComponentRates, c: Palette, f: Format): Plot.PlotOptions {
  const rows = d.rows.map((r) => ({ ...r, sharePct: r.share * 100, cumulativePct: r.cumulativeShare * 100 }));
  return {
    height: 340,
    marginLeft: 56,
    marginBottom: 96,
    x: { label: null, domain: rows.map((r) => r.name), tickRotate: -35 },
    y: { label: "Share of failures (%)", grid: true, domain: [0, 100] },
    marks: [
      Plot.barY(rows, { x: "name", y: "sharePct", fill: c.series[1], fillOpacity: 0.9 }),
      Plot.lineY(rows, { x: "name", y: "cumulativePct", stroke: c.ink, strokeWidth: 1.5, marker: "circle" }),
      Plot.ruleY([80], { stroke: c.muted, strokeDasharray: "4,3" }),
      Plot.tip(rows, Plot.pointerX({ x: "name", y: "sharePct", title: (r: (typeof rows)[number]) => `${r.name} (${r.system})\n${f.count(r.failures)} ${r.failures === 1 ? "failure" : "failures"}, ${f.percent(r.share)} of all\ncumulative ${f.percent(r.cumulativeShare)}` })),
      Plot.ruleY([0]),
    ],
  };
}

type MonthRow = MonthlyRates["rows"][number];
const monthDate = (m: string) => new Date(`${m}-01T00:00:00Z`);
// floored, so a month just short of full coverage never reads as 100 %
const coverageWords = (r: { complete: boolean; coverage: number | null }, f: Format) =>
  r.complete ? "" : `\nincomplete: hour readings cover ${f.percent(Math.floor((r.coverage ?? 0) * 1000) / 1000)} of its machine-days (no alarm)`;
const monthWords = (m: string, f: Format) => new Intl.DateTimeFormat(f.locale, { month: "short", year: "numeric", timeZone: "UTC" }).format(monthDate(m));

/**
 * Observed ÷ expected by month: 1 is what the month's own fleet (hours by age band, weather) predicts; the band is
 * the exact probability limits of complete months; incomplete months are hollow and carry no limits.
 */
export function standardisedMonthlyChart(d: MonthlyRates, c: Palette, f: Format): Plot.PlotOptions {
  const rows = d.rows.filter((r) => r.ratio !== null).map((r) => ({ ...r, date: monthDate(r.month), ratio: r.ratio! }));
  const complete = rows.filter((r) => r.complete);
  const top = Math.max(2, ...rows.map((r) => r.ratio)) * 1.1;
  return {
    height: 300,
    marginLeft: 56,
    x: { label: "Month the repair order opened", type: "utc" },
    y: { label: "Failures ÷ expected for the month's fleet", grid: true, domain: [0, top] },
    marks: [
      Plot.areaY(complete, { x: "date", y1: (r: MonthRow) => r.ratioLower ?? 0, y2: (r: MonthRow) => Math.min(r.ratioUpper ?? top, top), fill: c.accentSoft, curve: "step" }),
      Plot.ruleY([1], { stroke: c.muted, strokeDasharray: "5,3" }),
      Plot.lineY(complete, { x: "date", y: "ratio", stroke: c.series[0] }),
      Plot.dot(complete, { x: "date", y: "ratio", fill: (r: MonthRow) => (r.outOfControl ? c.alert : c.series[0]), r: 3 }),
      Plot.dot(rows.filter((r) => !r.complete), { x: "date", y: "ratio", stroke: c.muted, fill: "none", r: 3.5 }),
      Plot.tip(
        rows,
        Plot.pointerX({
          x: "date",
          y: "ratio",
          title: (r: MonthRow & { ratio: number }) =>
            `${monthWords(r.month, f)}: ${f.count(r.failures)} ${r.failures === 1 ? "failure" : "failures"}, ${f.quantity("plain", r.expected)} expected (${f.quantity("ratio", r.ratio)} ×)${r.ratioUpper !== null ? `\nlimits ${f.quantity("ratio", r.ratioLower)}–${f.quantity("ratio", r.ratioUpper)}` : ""}${r.outOfControl ? "\noutside the limits" : ""}${coverageWords(r, f)}`,
        }),
      ),
    ],
  };
}

/** u-chart: the plain monthly rate with its centre line and 3-sigma limits (complete months); incomplete months hollow. */
export function monthlyChart(d: MonthlyRates, c: Palette, f: Format): Plot.PlotOptions {
  const rows = d.rows
    .filter((r) => r.perThousandHours)
    .map((r) => ({ date: monthDate(r.month), month: r.month, rate: r.perThousandHours!.rate, lower: r.controlLower, upper: r.controlUpper, failures: r.failures, hours: r.engineHours, out: r.outOfControlPlain, complete: r.complete, coverage: r.coverage }));
  type Row = (typeof rows)[number];
  const complete = rows.filter((r) => r.complete);
  const centre = d.centre;
  // months with little exposure have very wide limits: keep the axis on the rates, clip the band
  const top = Math.max(...rows.map((r) => r.rate), centre ?? 0) * 1.15 || 1;
  return {
    height: 300,
    marginLeft: 56,
    x: { label: "Month the repair order opened", type: "utc" },
    y: { label: "Failures per 1,000 engine hours", grid: true, domain: [0, top] },
    marks: [
      Plot.areaY(complete, { x: "date", y1: (r: Row) => r.lower ?? 0, y2: (r: Row) => Math.min(r.upper ?? top, top), fill: c.accentSoft, curve: "step" }),
      ...(centre !== null ? [Plot.ruleY([centre], { stroke: c.muted, strokeDasharray: "5,3" })] : []),
      Plot.lineY(complete, { x: "date", y: "rate", stroke: c.series[0] }),
      Plot.dot(complete, { x: "date", y: "rate", fill: (r: Row) => (r.out ? c.alert : c.series[0]), r: 3 }),
      Plot.dot(rows.filter((r) => !r.complete), { x: "date", y: "rate", stroke: c.muted, fill: "none", r: 3.5 }),
      Plot.tip(
        rows,
        Plot.pointerX({
          x: "date",
          y: "rate",
          title: (r: Row) =>
            `${monthWords(r.month, f)}: ${f.quantity("rate", r.rate)} per ${f.count(1000)} h\n${f.count(r.failures)} ${r.failures === 1 ? "failure" : "failures"}, ${f.count(r.hours)} h${r.lower !== null && r.upper !== null ? `\nlimits ${f.quantity("rate", r.lower)}–${f.quantity("rate", r.upper)}` : ""}${r.out ? "\noutside the control limits" : ""}${coverageWords(r, f)}`,
        }),
      ),
    ],
  };
}
