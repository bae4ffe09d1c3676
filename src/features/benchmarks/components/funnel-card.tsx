import type { ReactNode } from "react";
import { ChartCard } from "@/components/chart-card";
import { palette } from "@/lib/palette";
import { funnelChart, type FunnelChartProps } from "../charts/benchmark-charts";
import { useBenchmarkFormat } from "../hooks/use-benchmark-format";

/**
 * A funnel plot with its table and CSV: one card for every funnel of the benchmarks (comebacks, first-time fix),
 * the rate and volume named by the caller. Without a group rate there is no funnel, and `hidden` says why.
 */
export function FunnelCard(props: {
  chart: FunnelChartProps;
  title: string;
  subtitle: ReactNode;
  /** what a point is ("Shop", "Technician") and what its volume counts ("Lines", "Complaints") */
  pointLabel: string;
  volumeLabel: string;
  rateLabel: string;
  filename: string;
  footer?: ReactNode;
  hidden?: string | null;
}) {
  const fm = useBenchmarkFormat();
  if (props.hidden) {
    return (
      <section aria-label={props.title} className="rounded-lg border border-line bg-card p-4 shadow-sm">
        <h2 className="text-base font-semibold">{props.title}</h2>
        <p className="mt-2 rounded border border-dashed border-line p-3 text-sm">{props.hidden}</p>
      </section>
    );
  }
  const num = (v: unknown) => (typeof v === "number" ? fm.count(v) : String(v ?? "–"));
  return (
    <ChartCard
      title={props.title}
      subtitle={props.subtitle}
      options={funnelChart(props.chart, palette)}
      rows={props.chart.points.map((p) => ({ label: p.label, volume: p.band === null ? p.x : p.volume, rate: p.rate * 100, status: p.words }))}
      columns={[
        { key: "label", label: props.pointLabel },
        { key: "volume", label: props.volumeLabel, csvLabel: `${props.volumeLabel} (count)`, format: num },
        { key: "rate", label: `${props.rateLabel} (%)`, percent: true, format: (v) => (typeof v === "number" ? fm.pct(v / 100) : "–") },
        { key: "status", label: "Against the funnel" },
      ]}
      filename={props.filename}
      footer={props.footer}
    />
  );
}
