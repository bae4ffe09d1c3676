import { useQuery } from "@tanstack/react-query";
import { rateQueries } from "@/features/rates/api/rate-queries";
import { hourBandChart, monthlyChart, paretoChart, temperatureBandChart } from "@/features/rates/charts/rate-charts";
import { FilterBar } from "@/features/filters/components/filter-bar";
import { QueryView } from "@/features/filters/components/query-view";
import { readFilters, useFilters } from "@/features/filters/use-filters";
import type { PrimeCache } from "@/app/page-loader";
import { useTemperatureUnit } from "@/features/filters/hooks/use-temperature-unit";
import { ChartCard } from "@/components/chart-card";
import { palette } from "@/lib/palette";
import { hourBandLabel, temperatureBandLabel } from "@shared/bands";

const num = (v: unknown) => (typeof v === "number" ? (Math.abs(v) >= 100 ? Math.round(v).toLocaleString("en-US") : v.toPrecision(3)) : String(v ?? ""));
const noFailures = "No failures and no exposure match these filters. Widen the dates, shops or components.";

// prefetched, not awaited: four rate analyses, each of which the page shows as it arrives
export const primeCache: PrimeCache = (qc, { url }) => {
  const { search } = readFilters(url.searchParams);
  void qc.prefetchQuery(rateQueries.hourBands(search));
  void qc.prefetchQuery(rateQueries.temperatureBands(search));
  void qc.prefetchQuery(rateQueries.components(search));
  void qc.prefetchQuery(rateQueries.monthly(search));
};

export function Component() {
  const { search } = useFilters();
  const [unit] = useTemperatureUnit();
  const hours = useQuery(rateQueries.hourBands(search));
  const temps = useQuery(rateQueries.temperatureBands(search));
  const comps = useQuery(rateQueries.components(search));
  const months = useQuery(rateQueries.monthly(search));
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Rates</h1>
        <p className="text-muted">Failures against the exposure that produced them: engine hours, cold days, components and months.</p>
      </div>
      <FilterBar />
      <div className="grid gap-4 lg:grid-cols-2">
        <QueryView query={hours} label="hour-band rates" isEmpty={(d) => d.rows.every((r) => r.failures === 0)} emptyText={noFailures}>
          {(d) => (
            <ChartCard
              title="Failure rate by engine-hour band"
              options={hourBandChart(d, palette)}
              rows={d.rows.map((r) => ({ band: hourBandLabel(r.band), failures: r.failures, engineHours: r.engineHours, rate: r.perThousandHours?.rate, lower: r.perThousandHours?.lower, upper: r.perThousandHours?.upper }))}
              columns={[{ key: "band", label: "Hour band" }, { key: "failures", label: "Failures" }, { key: "engineHours", label: "Engine hours", format: num }, { key: "rate", label: "Per 1,000 h", format: num }, { key: "lower", label: "95 % lower", format: num }, { key: "upper", label: "95 % upper", format: num }]}
              filename="rates-hour-bands.csv"
              footer={d.method}
            />
          )}
        </QueryView>
        <QueryView query={temps} label="temperature-band rates" isEmpty={(d) => d.rows.every((r) => r.failures === 0)} emptyText={noFailures}>
          {(d) => (
            <ChartCard
              title="Failure rate by daily minimum temperature"
              subtitle={`Shown in °${unit}; switch the unit in the filter bar`}
              options={temperatureBandChart(d, palette, unit)}
              rows={d.rows.map((r) => ({ band: temperatureBandLabel(r.band, unit), failures: r.failures, machineDays: r.machineDays, rate: r.perThousandMachineDays?.rate, perHours: r.perThousandHours?.rate }))}
              columns={[{ key: "band", label: "Daily minimum" }, { key: "failures", label: "Failures" }, { key: "machineDays", label: "Machine-days", format: num }, { key: "rate", label: "Per 1,000 machine-days", format: num }, { key: "perHours", label: "Per 1,000 h", format: num }]}
              filename="rates-temperature-bands.csv"
              footer={<>{d.method} <b>Caution:</b> {d.caution}</>}
            />
          )}
        </QueryView>
        <QueryView query={comps} label="the component Pareto" isEmpty={(d) => d.rows.length === 0} emptyText={noFailures}>
          {(d) => (
            <ChartCard
              title="Failures by component (Pareto)"
              subtitle="Bars: each component's share; line: cumulative share; dashed: 80 %"
              options={paretoChart(d, palette)}
              rows={d.rows.map((r) => ({ name: r.name, failures: r.failures, share: r.share * 100, cumulative: r.cumulativeShare * 100, rate: r.perThousandHours?.rate }))}
              columns={[{ key: "name", label: "Component" }, { key: "failures", label: "Failures" }, { key: "share", label: "Share %", format: num }, { key: "cumulative", label: "Cumulative %", format: num }, { key: "rate", label: "Per 1,000 h", format: num }]}
              filename="rates-components.csv"
            />
          )}
        </QueryView>
        <QueryView query={months} label="monthly rates" isEmpty={(d) => d.rows.length === 0} emptyText={noFailures}>
          {(d) => (
            <ChartCard
              title="Monthly failure rate with control limits"
              subtitle="Red points fall outside the limits"
              options={monthlyChart(d, palette)}
              rows={d.rows.map((r) => ({ month: r.month, failures: r.failures, engineHours: r.engineHours, rate: r.perThousandHours?.rate, lower: r.controlLower, upper: r.controlUpper, out: r.outOfControl ? "yes" : "" }))}
              columns={[{ key: "month", label: "Month" }, { key: "failures", label: "Failures" }, { key: "engineHours", label: "Engine hours", format: num }, { key: "rate", label: "Per 1,000 h", format: num }, { key: "lower", label: "Lower limit", format: num }, { key: "upper", label: "Upper limit", format: num }, { key: "out", label: "Outside" }]}
              filename="rates-monthly.csv"
              footer={d.method}
            />
          )}
        </QueryView>
      </div>
    </div>
  );
}
