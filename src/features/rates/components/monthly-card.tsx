import { useState } from "react";
import type { MonthlyRates } from "@shared/schemas/analytics-rates";
import { ChartCard } from "@/components/chart-card";
import { monthlyChart, standardisedMonthlyChart } from "@/features/rates/charts/rate-charts";
import { palette } from "@/lib/palette";
import { useFormat } from "@/lib/use-format";

/**
 * The monthly chart in two views: failures against what each month's own fleet predicts (observed ÷ expected,
 * the default) and the plain rate per 1,000 engine hours. Flagged months are said in words below it.
 */
export function MonthlyCard({ d }: { d: MonthlyRates }) {
  const [view, setView] = useState<"expected" | "plain">("expected");
  const fmt = useFormat();
  const as = (show: (n: number) => string) => (v: unknown) => (typeof v === "number" ? show(v) : String(v ?? ""));
  const expected = as((n) => fmt.quantity("plain", n));
  const ratio = as((n) => fmt.quantity("ratio", n));
  const hours = as((n) => fmt.quantity("hours", n));
  const rate = as((n) => fmt.quantity("rate", n));
  const coverage = as((n) => fmt.percent(n));
  const button = (id: "expected" | "plain", label: string) => (
    <button type="button" aria-pressed={view === id} onClick={() => setView(id)} className={`rounded border px-2 py-0.5 text-xs text-ink ${view === id ? "border-accent bg-accent-soft font-semibold" : "border-line bg-white hover:bg-paper"}`}>
      {label}
    </button>
  );
  const flaggedPlain = d.rows.filter((r) => r.outOfControlPlain).length;
  return (
    <ChartCard
      title={view === "expected" ? "Monthly failures against what the fleet predicts" : "Monthly failure rate with control limits"}
      subtitle={
        <span className="flex flex-wrap items-center gap-2">
          <span role="group" aria-label="Monthly chart view" className="inline-flex gap-1">
            {button("expected", "Against expected")}
            {button("plain", "Plain rate")}
          </span>
          <span>{view === "expected" ? "1 = what the month's hours, the fleet's ages and the weather predict; red: outside the limits; hollow: incomplete month" : "Red: outside the limits; hollow: incomplete month"}</span>
        </span>
      }
      options={view === "expected" ? standardisedMonthlyChart(d, palette, fmt) : monthlyChart(d, palette, fmt)}
      rows={d.rows.map((r) => ({
        month: r.month,
        failures: r.failures,
        expected: r.expected,
        ratio: r.ratio,
        ratioLower: r.ratioLower,
        ratioUpper: r.ratioUpper,
        engineHours: r.engineHours,
        rate: r.perThousandHours?.rate,
        lower: r.controlLower,
        upper: r.controlUpper,
        coverage: r.coverage,
        complete: r.complete ? "yes" : "no",
        out: r.outOfControl ? "yes" : "",
      }))}
      columns={[
        { key: "month", label: "Month" },
        { key: "failures", label: "Failures" },
        { key: "expected", label: "Expected failures", format: expected },
        { key: "ratio", label: "Observed ÷ expected", format: ratio },
        { key: "ratioLower", label: "Lower limit (ratio)", format: ratio },
        { key: "ratioUpper", label: "Upper limit (ratio)", format: ratio },
        { key: "engineHours", label: "Engine hours (h)", format: hours },
        { key: "rate", label: "Failures per 1,000 h", format: rate },
        { key: "lower", label: "Plain lower limit (per 1,000 h)", format: rate },
        { key: "upper", label: "Plain upper limit (per 1,000 h)", format: rate },
        { key: "coverage", label: "Readings coverage", csvLabel: "Readings coverage (fraction)", format: coverage },
        { key: "complete", label: "Complete" },
        { key: "out", label: "Outside the limits" },
      ]}
      filename="rates-monthly.csv"
      footer={
        <div className="space-y-2">
          {view === "expected" ? (
            d.flagged.length ? (
              <ul className="list-disc space-y-1 pl-5 text-sm" data-testid="flagged-months">
                {d.flagged.map((f) => <li key={f.month}>{f.words}</li>)}
              </ul>
            ) : (
              <p className="text-sm" data-testid="flagged-months">
                No complete month lies outside the limits: every month's failures are what its fleet's hours, ages and weather explain
                {flaggedPlain ? ` (the plain rate chart flags ${flaggedPlain}, which the fleet's ageing and the weather account for)` : ""}.
              </p>
            )
          ) : null}
          {d.incompleteNote && <p className="text-sm">{d.incompleteNote}</p>}
          <p>{view === "expected" ? d.method : d.plainMethod}</p>
          {view === "expected" && d.reference && <p>Reference rates: {d.reference.from} to {d.reference.to} ({d.reference.months} complete months).</p>}
        </div>
      }
    />
  );
}
