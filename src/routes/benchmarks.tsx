import { useQuery } from "@tanstack/react-query";
import { ChartCard } from "@/components/chart-card";
import { QueryView } from "@/features/filters/components/query-view";
import { palette } from "@/lib/palette";
import { benchmarkQueries } from "@/features/benchmarks/api/benchmark-queries";
import { comebackFunnel, trendChart } from "@/features/benchmarks/charts/benchmark-charts";
import { FunnelCard } from "@/features/benchmarks/components/funnel-card";
import { useBenchmarkFormat } from "@/features/benchmarks/hooks/use-benchmark-format";
import { ComebackPairsPanel } from "@/features/benchmarks/components/comeback-pairs";
import { KpiTable } from "@/features/benchmarks/components/kpi-table";
import { PeriodControls } from "@/features/benchmarks/components/period-controls";
import { KpiLinesPanel } from "@/features/benchmarks/components/kpi-lines";
import { WaitsSection } from "@/features/benchmarks/components/waits-section";
import { FixCycleSection } from "@/features/benchmarks/components/fix-cycle-section";
import type { LineKpi } from "@shared/schemas/benchmark-details";
import { OwnShopSummary, VisitList } from "@/features/benchmarks/components/visit-list";
import { readBenchmarkParams, useBenchmarkParams } from "@/features/benchmarks/hooks/use-benchmark-params";
import type { PrimeCache } from "@/app/page-loader";
import type { Funnel } from "@shared/schemas/benchmarks";

function FunnelWords({ d }: { d: Funnel }) {
  const above = d.points.filter((p) => p.status === "above_998" || p.status === "above_95");
  return (
    <>
      {above.length === 0 ? (
        <p>Every shop is inside the funnel: none differs from the group by more than chance at its volume.</p>
      ) : (
        <ul className="list-disc pl-5">
          {above.map((p) => (
            <li key={p.key} className="text-ink">
              <b>{p.label}</b>: {p.words}.
            </li>
          ))}
        </ul>
      )}
      {d.notRated.length > 0 && <p>Not rated (fewer than 30 lines): {d.notRated.join(", ")}.</p>}
      <p className="mt-1">{d.method}</p>
    </>
  );
}

// prefetched, not awaited: the benchmarks, funnel and trend are computed over a year of repair orders; the
// page shows each as it arrives
export const primeCache: PrimeCache = (qc, { url }) => {
  const params = readBenchmarkParams(url.searchParams);
  void qc.prefetchQuery(benchmarkQueries.shops(params));
  void qc.prefetchQuery(benchmarkQueries.funnel(params));
  void qc.prefetchQuery(benchmarkQueries.trend(params));
  void qc.prefetchQuery(benchmarkQueries.waits(params));
  void qc.prefetchQuery(benchmarkQueries.fixCycle(params));
};

export function Component() {
  const { params, drill, technician, kpi, update } = useBenchmarkParams();
  const shops = useQuery(benchmarkQueries.shops(params));
  const funnel = useQuery(benchmarkQueries.funnel(params));
  const trend = useQuery(benchmarkQueries.trend(params));
  const open = (shop: string, tech?: string, lineKpi?: LineKpi) => {
    update({ shop, tech, kpi: lineKpi });
    requestAnimationFrame(() => document.getElementById("comeback-pairs")?.scrollIntoView({ behavior: "smooth", block: "start" }));
  };
  const drillShop = shops.data?.shops.find((s) => s.shopCode === drill && s.drillDown);
  const fm = useBenchmarkFormat();
  const rate1 = (v: unknown) => (typeof v === "number" ? fm.pct(v / 100) : "–");

  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Shop benchmarks</h1>
        <p className="text-muted">Comebacks, first-time fix, labour against standard time, parts waits, cycle time and claims, shop by shop, judged against the group at each shop's volume.</p>
      </div>
      <PeriodControls params={params} period={shops.data?.period} onChange={update} />

      <QueryView query={shops} label="the benchmarks" lines={6}>
        {(d) => (d.viewer.groupWide ? <VisitList data={d} onOpen={open} /> : <OwnShopSummary data={d} onOpen={open} />)}
      </QueryView>

      {drillShop && kpi && (
        <div id="comeback-pairs">
          <KpiLinesPanel
            params={params}
            shop={drillShop}
            kpi={kpi}
            technician={technician}
            onKpi={(k) => update({ kpi: k })}
            onTechnician={(tech) => update({ tech })}
            onClose={() => update({ shop: undefined, tech: undefined, kpi: undefined })}
          />
        </div>
      )}
      {drillShop && !kpi && (
        <div id="comeback-pairs">
          <ComebackPairsPanel
            params={params}
            shop={drillShop}
            technician={technician}
            onTechnician={(tech) => update({ tech })}
            onClose={() => update({ shop: undefined, tech: undefined })}
          />
        </div>
      )}

      <div className="grid gap-4 xl:grid-cols-2">
        <QueryView query={funnel} label="the funnel" lines={6}>
          {(f) => (
            <FunnelCard
              chart={comebackFunnel(f, fm.count)}
              title="Funnel: comeback rate against volume"
              subtitle={`${f.period.label} · group rate ${fm.pct(f.groupRate)} · shaded: 95 % and 99.8 % limits`}
              pointLabel="Shop"
              volumeLabel="Lines"
              rateLabel="Comeback rate"
              filename={`funnel-${f.period.key}.csv`}
              footer={<FunnelWords d={f} />}
              hidden={f.groupHidden}
            />
          )}
        </QueryView>
        <QueryView query={trend} label="the trend" lines={6}>
          {(t) => (
            <ChartCard
              title="Trend by month"
              subtitle={t.groupHidden ? `Comeback rate over the 12 months ending with each month. ${t.groupHidden}` : "Comeback rate over the 12 months ending with each month; dashed: the group"}
              options={trendChart(t, palette, fm.pct)}
              rows={t.series.flatMap((s) =>
                s.points.map((p) => ({ label: s.label, month: p.month, rolling: p.rolling.value === null ? null : p.rolling.value * 100, monthLines: p.monthLines, monthRate: p.monthRate === null ? null : p.monthRate * 100 })),
              )}
              columns={[
                { key: "label", label: "Shop" },
                { key: "month", label: "Month" },
                { key: "rolling", label: "12-month rate %", percent: true, format: rate1 },
                { key: "monthLines", label: "Lines in the month", csvLabel: "Lines in the month (count)", format: (v) => (typeof v === "number" ? fm.count(v) : "–") },
                { key: "monthRate", label: "Month's own rate % (30+ lines)", percent: true, csvLabel: "Month's own rate, 30+ lines (fraction)", format: rate1 },
              ]}
              filename={`trend-${t.period.key}.csv`}
              footer={t.method}
            />
          )}
        </QueryView>
      </div>

      {shops.data && <KpiTable data={shops.data} onOpen={(s, k) => open(s, undefined, k)} />}

      <WaitsSection params={params} />
      <FixCycleSection params={params} />
    </div>
  );
}
