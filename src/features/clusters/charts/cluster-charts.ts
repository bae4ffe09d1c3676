import * as Plot from "@observablehq/plot";
import type { Palette } from "@/lib/palette";
import type { ClusterDetail } from "@shared/schemas/analytics-clusters";
import type { Format } from "@shared/format";

/** The cluster's failures by the month the repair order opened. */
export function clusterTimelineChart(d: ClusterDetail, c: Palette, f: Format): Plot.PlotOptions {
  const month = new Intl.DateTimeFormat(f.locale, { month: "short", year: "numeric", timeZone: "UTC" });
  const rows = d.timeline.map((t) => ({ ...t, date: new Date(`${t.month}-01T00:00:00Z`) }));
  return {
    height: 220,
    marginLeft: 48,
    x: { type: "utc", label: "Month the repair order opened" },
    y: { label: "Failures", grid: true, zero: true },
    marks: [
      Plot.rectY(rows, { x: "date", interval: "month", y: "failures", fill: c.series[0], inset: 0.5 }),
      Plot.tip(rows, Plot.pointerX({ x: "date", y: "failures", title: (r: (typeof rows)[number]) => `${month.format(r.date)}: ${f.count(r.failures)} failure${r.failures === 1 ? "" : "s"}` })),
      Plot.ruleY([0]),
    ],
  };
}

/**
 * Where the cluster's failures fall across bands, as a share of the cluster, beside the share of every other
 * failure of the same components: a cluster that leans cold stands out against the rest.
 */
export function clusterProfileChart(profile: ClusterDetail["hourProfile"], label: (band: string) => string, axis: string, c: Palette, f: Format): Plot.PlotOptions {
  const totalIn = profile.reduce((s, b) => s + b.inCluster, 0) || 1;
  const totalOut = profile.reduce((s, b) => s + b.elsewhere, 0) || 1;
  const rows = profile.flatMap((b) => [
    { band: label(b.band), series: "This cluster", share: (b.inCluster / totalIn) * 100, n: b.inCluster },
    { band: label(b.band), series: "Other failures", share: (b.elsewhere / totalOut) * 100, n: b.elsewhere },
  ]);
  const bands = profile.map((b) => label(b.band));
  return {
    height: 240,
    marginLeft: 48,
    marginBottom: 56,
    fx: { label: axis, domain: bands, padding: 0.15, tickRotate: bands.length > 5 ? -20 : 0 },
    x: { axis: null, domain: ["This cluster", "Other failures"] },
    y: { label: "Share of failures (%)", grid: true, zero: true },
    color: { domain: ["This cluster", "Other failures"], range: [c.series[3], c.series[7]], legend: true },
    marks: [
      Plot.barY(rows, { fx: "band", x: "series", y: "share", fill: "series" }),
      Plot.tip(rows, Plot.pointer({ fx: "band", x: "series", y: "share", title: (r: (typeof rows)[number]) => `${r.band}, ${r.series.toLowerCase()}: ${f.count(r.n)} (${f.percent(r.share / 100)})` })),
      Plot.ruleY([0]),
    ],
  };
}
