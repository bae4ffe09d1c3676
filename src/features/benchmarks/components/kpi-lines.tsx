import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import type { ShopBenchmark } from "@shared/schemas/benchmarks";
import { lineKpiLabels, type BenchmarkLines, type KpiLine, type LineKpi } from "@shared/schemas/benchmark-details";
import { apiPaths } from "@shared/api-paths";
import { EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { benchmarkQueries, type BenchmarkParams } from "../api/benchmark-queries";
import type { BenchmarkFormat } from "../format";
import { useBenchmarkFormat } from "../hooks/use-benchmark-format";

const PAGE = 50;

/** The KPI as the lines give it, in words. */
function totalsText(b: BenchmarkLines, { pct, days, hours, count }: BenchmarkFormat): string {
  const t = b.totals;
  if (b.kpi === "efficiency") return `${pct(t.value)} = ${hours(t.standardHours)} standard ÷ ${hours(t.actualHours)} actual over ${count(t.lines)} lines`;
  if (b.kpi === "partsWait") return `median ${days(t.median)}, 90th percentile ${days(t.p90)} over ${count(t.lines)} part lines`;
  const what = { backOrder: "back-ordered", coldStart: "with a reading", claims: "on time" }[b.kpi];
  return `${count(t.counted)} of ${count(t.lines)} ${what} (${pct(t.value)})`;
}

const columns = ({ pct, days, hours, count }: BenchmarkFormat): Record<LineKpi, { head: string; cell: (l: KpiLine) => string }[]> => ({
  efficiency: [
    { head: "Labour op", cell: (l) => l.laborOp ?? "–" },
    { head: "Standard", cell: (l) => hours(l.standardHours) },
    { head: "Actual", cell: (l) => hours(l.actualHours) },
    { head: "Efficiency", cell: (l) => (l.efficiency === null ? "no time booked" : pct(l.efficiency)) },
  ],
  partsWait: [
    { head: "Part", cell: (l) => l.partNumber ?? "–" },
    { head: "Ordered", cell: (l) => l.ordered ?? "–" },
    { head: "Received", cell: (l) => l.received ?? "–" },
    { head: "Wait", cell: (l) => days(l.waitDays) },
  ],
  backOrder: [
    { head: "Part", cell: (l) => l.partNumber ?? "–" },
    { head: "Ordered", cell: (l) => l.ordered ?? "–" },
    { head: "Received", cell: (l) => l.received ?? "not yet" },
    { head: "Back-ordered", cell: (l) => (l.backOrdered ? "yes" : "no") },
  ],
  coldStart: [
    { head: "Readings", cell: (l) => count(l.readings ?? 0) },
    { head: "Measured", cell: (l) => (l.counted ? "yes" : "no reading") },
  ],
  claims: [
    { head: "Claim", cell: (l) => l.claimNumber ?? "–" },
    { head: "Deadline", cell: (l) => l.deadline ?? "–" },
    { head: "Filed", cell: (l) => l.filed ?? "not filed" },
    { head: "On time", cell: (l) => (l.onTime ? "yes" : "late") },
  ],
});

/** The lines behind one KPI of a shop, worst first, with the same filters as the table and a CSV of them all. */
export function KpiLinesPanel(props: {
  params: BenchmarkParams;
  shop: ShopBenchmark;
  kpi: LineKpi;
  technician: string | undefined;
  onKpi: (kpi: LineKpi) => void;
  onTechnician: (tech: string | undefined) => void;
  onClose: () => void;
}) {
  const { params, shop, kpi, technician } = props;
  const [shown, setShown] = useState(PAGE);
  const query = { ...params, kpi, shop: shop.shopCode!, technician };
  const q = useQuery(benchmarkQueries.lines(query));
  const fm = useBenchmarkFormat();
  const cols = columns(fm)[kpi];
  return (
    <section aria-label="Lines behind the figure" className="min-w-0 rounded-lg border border-line bg-card p-4 shadow-sm">
      <div className="mb-2 flex flex-wrap items-start justify-between gap-2">
        <div className="min-w-0">
          <h2 className="text-base font-semibold">
            {lineKpiLabels[kpi]} — {shop.label}
            {technician && kpi !== "claims" ? `, technician ${technician}` : ""}
          </h2>
          {q.data && <p className="text-sm">{totalsText(q.data, fm)}</p>}
        </div>
        <div className="flex gap-2 text-sm">
          <a className="rounded border border-line px-2 py-1 hover:bg-paper" href={apiPaths.benchmarks("lines.csv", { ...query })} download>
            CSV
          </a>
          <button type="button" onClick={props.onClose} className="rounded border border-line px-2 py-1 hover:bg-paper">
            Close
          </button>
        </div>
      </div>
      <div className="mb-3 flex flex-wrap items-center gap-2 text-sm" role="group" aria-label="Figure">
        {(Object.keys(lineKpiLabels) as LineKpi[]).map((k) => (
          <button key={k} type="button" aria-pressed={k === kpi} onClick={() => (setShown(PAGE), props.onKpi(k))} className={`rounded border px-2 py-0.5 ${k === kpi ? "border-slate bg-slate text-paper" : "border-line"}`}>
            {lineKpiLabels[k]}
          </button>
        ))}
      </div>
      {kpi !== "claims" && shop.technicians && shop.technicians.length > 0 && (
        <label className="mb-3 flex flex-wrap items-center gap-2 text-sm">
          <span className="text-muted">Technician</span>
          <select className="rounded border border-line bg-card px-2 py-1" value={technician ?? ""} onChange={(e) => props.onTechnician(e.target.value || undefined)}>
            <option value="">All</option>
            {shop.technicians.map((t) => (
              <option key={t.techId} value={t.techId}>
                {t.techId} {t.name}
              </option>
            ))}
          </select>
        </label>
      )}
      {q.isPending ? (
        <Skeleton lines={4} label="Loading the lines" />
      ) : q.isError ? (
        <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
      ) : q.data.lines.length === 0 ? (
        <EmptyState title="No lines">No line of {shop.label} counts towards this figure in {q.data.period.label}.</EmptyState>
      ) : (
        <>
          <div className="max-h-[32rem] overflow-auto">
            <table className="w-full text-left text-sm">
              <thead className="sticky top-0 bg-card text-muted">
                <tr>
                  <th className="border-b border-line py-1 pr-3">RO / line</th>
                  <th className="border-b border-line py-1 pr-3">Closed</th>
                  {kpi !== "claims" && <th className="border-b border-line py-1 pr-3">Technician · component</th>}
                  {cols.map((c) => (
                    <th key={c.head} className="border-b border-line py-1 pr-3">{c.head}</th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {q.data.lines.slice(0, shown).map((l, i) => (
                  <tr key={i} className="border-b border-line/50 align-top">
                    <td className="py-1 pr-3 font-semibold">{l.lineNo === null ? l.roNumber || "–" : `${l.roNumber}/${l.lineNo}`}</td>
                    <td className="py-1 pr-3 tabular-nums">{l.closed ?? "open"}</td>
                    {kpi !== "claims" && (
                      <td className="py-1 pr-3">
                        <span className="block">{l.technician ?? "no technician"}</span>
                        <span className="block text-xs text-muted">{l.component}</span>
                      </td>
                    )}
                    {cols.map((c) => (
                      <td key={c.head} className="py-1 pr-3 tabular-nums">{c.cell(l)}</td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <p className="mt-2 text-xs text-muted">
            {q.data.rule} Showing {Math.min(shown, q.data.lines.length)} of {q.data.lines.length}; the CSV holds them all.
            {shown < q.data.lines.length && (
              <button type="button" className="ml-2 underline" onClick={() => setShown((n) => n + PAGE * 4)}>
                Show more
              </button>
            )}
          </p>
        </>
      )}
    </section>
  );
}
