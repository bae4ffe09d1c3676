import { useQuery } from "@tanstack/react-query";
import { useSearchParams } from "react-router-dom";
import { rateQueries } from "@/features/rates/api/rate-queries";
import { RateComparisonView } from "@/features/rates/components/rate-comparison-view";
import { CostTable } from "@/features/rates/components/cost-table";
import { shopQueries } from "@/features/filters/api/shop-queries";
import { Card } from "@/components/ui/states";
import { hourBandChart, paretoChart, temperatureBandChart } from "@/features/rates/charts/rate-charts";
import { MonthlyCard } from "@/features/rates/components/monthly-card";
import { FilterBar } from "@/features/filters/components/filter-bar";
import { QueryView } from "@/features/filters/components/query-view";
import { readFilters, useFilters } from "@/features/filters/use-filters";
import type { PrimeCache } from "@/app/page-loader";
import { currentTemperatureUnit, useTemperatureUnit } from "@/features/filters/hooks/use-temperature-unit";
import { ChartCard } from "@/components/chart-card";
import { palette } from "@/lib/palette";
import { hourBandLabel } from "@shared/bands";
import { components, engineFamilies } from "@shared/catalog";
import { useFormat } from "@/lib/use-format";

const noFailures = "No failures and no exposure match these filters. Widen the dates, shops or components.";
const field = "mt-1 block rounded border border-line bg-white px-2 py-1 text-sm";
const label = "text-xs font-semibold uppercase tracking-wide text-muted";
const COMPARE_BY = [
  { id: "lot", label: "Two lots", noun: "Lot" },
  { id: "engineFamily", label: "Two engine families", noun: "Family" },
  { id: "shop", label: "Two shops", noun: "Shop" },
] as const;

/** The comparison's choices as the URL holds them, and its query string (null until group A is named). */
function readComparison(params: URLSearchParams, filterSearch: string) {
  const by = (params.get("cmpBy") ?? "lot") as (typeof COMPARE_BY)[number]["id"];
  const a = params.get("cmpA") ?? "";
  const b = params.get("cmpB") ?? "";
  const part = params.get("cmpPart") ?? "ENG-CSA-HPLUG";
  if (!a) return { by, a, b, part, search: null };
  const q = new URLSearchParams(filterSearch);
  q.delete("components");
  q.set("compareBy", by);
  q.set("a", a);
  if (b) q.set("b", b);
  if (part) q.set("component", part);
  return { by, a, b, part, search: q.toString() };
}

// prefetched, not awaited: four rate analyses, each of which the page shows as it arrives
export const primeCache: PrimeCache = (qc, { url }) => {
  const { search } = readFilters(url.searchParams);
  void qc.prefetchQuery(rateQueries.hourBands(search));
  void qc.prefetchQuery(rateQueries.temperatureBands(search, currentTemperatureUnit()));
  void qc.prefetchQuery(rateQueries.components(search));
  void qc.prefetchQuery(rateQueries.monthly(search));
  void qc.prefetchQuery(rateQueries.costs(search));
  const cmp = readComparison(url.searchParams, search);
  if (cmp.search) void qc.prefetchQuery(rateQueries.compare(cmp.search));
};

export function Component() {
  const fmt = useFormat();
  const num = (v: unknown, show: (n: number) => string) => (typeof v === "number" ? show(v) : String(v ?? ""));
  const wholeHours = (v: unknown) => num(v, (n) => fmt.quantity("hours", n));
  const rate = (v: unknown) => num(v, (n) => fmt.quantity("rate", n));
  const share = (v: unknown) => num(v, (n) => fmt.quantity("percent", n));
  const { search } = useFilters();
  const [unit] = useTemperatureUnit();
  const hours = useQuery(rateQueries.hourBands(search));
  const temps = useQuery(rateQueries.temperatureBands(search, unit));
  const comps = useQuery(rateQueries.components(search));
  const months = useQuery(rateQueries.monthly(search));
  const costs = useQuery(rateQueries.costs(search));
  const [params, setParams] = useSearchParams();
  const cmp = readComparison(params, search);
  const comparison = useQuery({ ...rateQueries.compare(cmp.search ?? ""), enabled: cmp.search !== null });
  const shops = useQuery(shopQueries.list());
  const set = (next: Record<string, string>) => {
    const p2 = new URLSearchParams(params);
    for (const [k, v] of Object.entries(next)) (v ? p2.set(k, v) : p2.delete(k));
    setParams(p2, { replace: true });
  };
  const noun = COMPARE_BY.find((c) => c.id === cmp.by)?.noun ?? "Group";
  const choice = (key: "cmpA" | "cmpB", value: string) => {
    const name = key === "cmpA" ? `${noun} A` : `${noun} B`;
    if (cmp.by === "lot") {
      return (
        <label className={label}>{name}
          <input key={`${cmp.by}-${key}-${value}`} className={field} defaultValue={value} placeholder={key === "cmpA" ? "lot code" : "all other lots"} onBlur={(e) => set({ [key]: e.target.value.trim() })} onKeyDown={(e) => e.key === "Enter" && set({ [key]: e.currentTarget.value.trim() })} />
        </label>
      );
    }
    const options = cmp.by === "engineFamily" ? engineFamilies.map((f) => ({ id: f.code, name: f.code })) : (shops.data?.shops ?? []).map((s) => ({ id: s.code, name: `${s.code} ${s.name ?? ""}`.trim() }));
    return (
      <label className={label}>{name}
        <select className={field} value={value} onChange={(e) => set({ [key]: e.target.value })}>
          <option value="">{key === "cmpA" ? "choose…" : `all other ${cmp.by === "shop" ? "shops" : "families"}`}</option>
          {options.map((o) => <option key={o.id} value={o.id}>{o.name}</option>)}
        </select>
      </label>
    );
  };
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Rates</h1>
        <p className="text-muted">Failures against the exposure that produced them: engine hours, cold days, components and months.</p>
      </div>
      <FilterBar />
      <Card title="Compare two groups">
        <div className="flex flex-wrap items-end gap-3">
          <label className={label}>Compare
            <select className={field} value={cmp.by} onChange={(e) => set({ cmpBy: e.target.value, cmpA: "", cmpB: "" })}>
              {COMPARE_BY.map((c) => <option key={c.id} value={c.id}>{c.label}</option>)}
            </select>
          </label>
          {choice("cmpA", cmp.a)}
          {choice("cmpB", cmp.b)}
          <label className={label}>Failures of
            <select className={field} value={cmp.part} onChange={(e) => set({ cmpPart: e.target.value })}>
              {components.filter((c) => c.code !== "SVC-PM").map((c) => <option key={c.code} value={c.code}>{c.name}</option>)}
            </select>
          </label>
        </div>
        <div className="mt-3">
          {cmp.search === null ? (
            <p className="text-sm text-muted">Name group A to compare its failures per 1,000 engine hours with group B (or with everything else in the filters).</p>
          ) : (
            <QueryView query={comparison} label="the comparison" lines={3}>
              {(d) => <RateComparisonView d={d} />}
            </QueryView>
          )}
        </div>
      </Card>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-2">
        <QueryView query={hours} label="hour-band rates" isEmpty={(d) => d.rows.every((r) => r.failures === 0)} emptyText={noFailures}>
          {(d) => (
            <ChartCard
              title="Failure rate by engine-hour band"
              options={hourBandChart(d, palette, fmt)}
              rows={d.rows.map((r) => ({ band: hourBandLabel(r.band), failures: r.failures, engineHours: r.engineHours, rate: r.perThousandHours?.rate, lower: r.perThousandHours?.lower, upper: r.perThousandHours?.upper }))}
              columns={[{ key: "band", label: "Hour band" }, { key: "failures", label: "Failures" }, { key: "engineHours", label: "Engine hours", csvLabel: "Engine hours (h)", format: wholeHours }, { key: "rate", label: "Per 1,000 h", format: rate }, { key: "lower", label: "95 % lower", csvLabel: "95 % lower (per 1,000 h)", format: rate }, { key: "upper", label: "95 % upper", csvLabel: "95 % upper (per 1,000 h)", format: rate }]}
              filename="rates-hour-bands.csv"
              footer={d.method}
            />
          )}
        </QueryView>
        <QueryView query={temps} label="temperature-band rates" isEmpty={(d) => d.rows.every((r) => r.failures === 0)} emptyText={noFailures}>
          {(d) => (
            <ChartCard
              title="Failure rate by daily minimum temperature"
              subtitle={`Shown in °${d.unit}; switch the unit in the filter bar`}
              options={temperatureBandChart(d, palette, fmt)}
              rows={d.rows.map((r) => ({ band: r.label, failures: r.failures, machineDays: r.machineDays, rate: r.perThousandMachineDays?.rate, perHours: r.perThousandHours?.rate }))}
              columns={[{ key: "band", label: "Daily minimum" }, { key: "failures", label: "Failures" }, { key: "machineDays", label: "Machine-days", format: wholeHours }, { key: "rate", label: "Per 1,000 machine-days", format: rate }, { key: "perHours", label: "Per 1,000 h", format: rate }]}
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
              options={paretoChart(d, palette, fmt)}
              rows={d.rows.map((r) => ({ name: r.name, failures: r.failures, share: r.share * 100, cumulative: r.cumulativeShare * 100, rate: r.perThousandHours?.rate }))}
              columns={[{ key: "name", label: "Component" }, { key: "failures", label: "Failures" }, { key: "share", label: "Share %", percent: true, format: share }, { key: "cumulative", label: "Cumulative %", percent: true, format: share }, { key: "rate", label: "Per 1,000 h", format: rate }]}
              filename="rates-components.csv"
            />
          )}
        </QueryView>
        <QueryView query={months} label="monthly rates" isEmpty={(d) => d.rows.length === 0} emptyText={noFailures}>
          {(d) => <MonthlyCard d={d} />}
        </QueryView>
      </div>
      <Card title="Repair cost per 1,000 engine hours">
        <QueryView query={costs} label="repair costs" isEmpty={(d) => d.shops.length === 0} emptyText={noFailures}>
          {(d) => <CostTable d={d} />}
        </QueryView>
      </Card>
    </div>
  );
}
