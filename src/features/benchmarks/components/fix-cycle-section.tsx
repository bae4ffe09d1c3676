import { Fragment, useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { QueryView } from "@/features/filters/components/query-view";
import { downloadText, toCsv } from "@/lib/csv";
import type { FixCycle, FixRow } from "@shared/schemas/benchmark-details";
import type { FunnelStatus } from "@shared/schemas/benchmarks";
import { benchmarkQueries, type BenchmarkParams } from "../api/benchmark-queries";
import { fixFunnel } from "../charts/benchmark-charts";
import { useBenchmarkFormat } from "../hooks/use-benchmark-format";
import { FunnelCard } from "./funnel-card";

const statusClass: Record<FunnelStatus, string> = {
  above_998: "bg-ok/15 text-ink",
  above_95: "bg-ok/15 text-ink",
  within: "bg-accent-soft text-ink",
  below_95: "bg-ochre text-ink",
  below_998: "bg-alert text-white",
  not_rated: "bg-paper text-muted",
};
const statusText: Record<FunnelStatus, string> = {
  above_998: "above 99.8 %",
  above_95: "above 95 %",
  within: "within",
  below_95: "below 95 %",
  below_998: "below 99.8 %",
  not_rated: "not rated",
};

function Row({ r, group, sub }: { r: FixRow; group?: boolean; sub?: boolean }) {
  const fm = useBenchmarkFormat();
  const f = r.funnel;
  const c = r.cycle;
  return (
    <tr className={group ? "bg-paper/60 font-medium" : sub ? "text-xs" : ""}>
      <th scope="row" className={`border-b border-line/60 px-2 py-1.5 text-left font-semibold ${sub ? "pl-6 font-normal" : ""}`}>{r.label}</th>
      <td className="border-b border-line/60 px-2 py-1.5 tabular-nums">
        {fm.count(f.complaints)} → {fm.count(f.noReturn)} → {fm.count(f.fixed)}
      </td>
      <td className="border-b border-line/60 px-2 py-1.5 tabular-nums">
        <span className="block">{fm.value(r.firstTimeFix)}</span>
        <span className="block text-xs text-muted">{fm.interval(r.firstTimeFix)}</span>
      </td>
      <td className="border-b border-line/60 px-2 py-1.5">
        {group ? "—" : <span className={`rounded px-1.5 py-0.5 text-xs font-semibold ${statusClass[r.status]}`} title={r.words}>{statusText[r.status]}</span>}
      </td>
      <td className="border-b border-line/60 px-2 py-1.5 tabular-nums">
        {fm.days(c.median)} <span className="text-xs text-muted">({fm.medianLimits(c.medianLimits, c.orders)})</span> · {fm.days(c.p90)}
        <span className="block text-xs text-muted">{fm.count(c.orders)} ROs</span>
      </td>
      <td className="border-b border-line/60 px-2 py-1.5 tabular-nums">
        {fm.pct(c.waitingShare)} of cycle days
        <span className="block text-xs text-muted">
          {fm.count(c.ordersWaiting)} ROs waited: median {fm.days(c.waitingDaysMedian)} waiting ({fm.medianLimits(c.waitingDaysLimits, c.ordersWaiting)})
        </span>
      </td>
    </tr>
  );
}

const CSV_COLUMNS = [
  { key: "label", label: "Shop / technician" },
  { key: "level", label: "Level" },
  { key: "complaints", label: "Complaints (count)" },
  { key: "noReturn", label: "Without a return for parts (count)" },
  { key: "fixed", label: "Fixed first time (count)" },
  { key: "ftf", label: "First-time fix (fraction)" },
  { key: "ftfLower", label: "First-time fix 95 % lower (fraction)" },
  { key: "ftfUpper", label: "First-time fix 95 % upper (fraction)" },
  { key: "funnel", label: "Funnel" },
  { key: "orders", label: "ROs (count)" },
  { key: "median", label: "Cycle median (days)" },
  { key: "medianLower", label: "Cycle median 95 % lower (days)" },
  { key: "medianUpper", label: "Cycle median 95 % upper (days)" },
  { key: "medianCoverage", label: "Cycle median interval coverage (fraction)" },
  { key: "p90", label: "Cycle p90 (days)" },
  { key: "waitingShare", label: "Cycle days waiting for parts (fraction)" },
  { key: "ordersWaiting", label: "ROs that waited for parts (count)" },
  { key: "waitingMedian", label: "Days waiting for parts, median (days)" },
  { key: "waitingLower", label: "Days waiting for parts, median 95 % lower (days)" },
  { key: "waitingUpper", label: "Days waiting for parts, median 95 % upper (days)" },
];

const csvRow = (r: FixRow, level: string) => ({
  label: r.label, level, complaints: r.funnel.complaints, noReturn: r.funnel.noReturn, fixed: r.funnel.fixed,
  ftf: r.firstTimeFix.value, ftfLower: r.firstTimeFix.lower, ftfUpper: r.firstTimeFix.upper, funnel: level === "group" ? null : statusText[r.status],
  orders: r.cycle.orders, median: r.cycle.median, medianLower: r.cycle.medianLimits?.from ?? null, medianUpper: r.cycle.medianLimits?.to ?? null,
  medianCoverage: r.cycle.medianLimits?.coverage ?? null, p90: r.cycle.p90, waitingShare: r.cycle.waitingShare, ordersWaiting: r.cycle.ordersWaiting,
  waitingMedian: r.cycle.waitingDaysMedian, waitingLower: r.cycle.waitingDaysLimits?.from ?? null, waitingUpper: r.cycle.waitingDaysLimits?.to ?? null,
});

/** The table as CSV: the group (when shown), each shop and its technicians; raw numbers, units in the headers. */
export const fixCycleCsv = (d: FixCycle): string =>
  toCsv(CSV_COLUMNS, [...(d.group ? [csvRow(d.group, "group")] : []), ...d.shops.flatMap((s) => [csvRow(s, "shop"), ...s.technicians.map((t) => csvRow(t, `technician of ${s.key}`))])]);

/** First-time fix on a funnel (shops, or one shop's technicians), its counts, and RO cycle time with intervals. */
export function FixCycleSection({ params }: { params: BenchmarkParams }) {
  const q = useQuery(benchmarkQueries.fixCycle(params));
  const fm = useBenchmarkFormat();
  const [open, setOpen] = useState<string | null>(null);
  return (
    <QueryView query={q} label="first-time fix and cycle time" lines={6}>
      {(d) => {
        const below = d.shops.filter((s) => s.status.startsWith("below"));
        const opened = d.shops.find((s) => s.key === open);
        const rows = opened ? opened.technicians : d.shops;
        const chart = fixFunnel(rows, d, fm.count);
        return (
          <div className="space-y-4">
            <FunnelCard
              chart={chart}
              title={opened ? `Funnel: first-time fix of the technicians of ${opened.label}` : "Funnel: first-time fix against complaints"}
              subtitle={`${d.period.label} · group rate ${fm.pct(d.groupRate)} · shaded: 95 % and 99.8 % limits; above the funnel is better than the group`}
              pointLabel={opened ? "Technician" : "Shop"}
              volumeLabel="Complaints"
              rateLabel="First-time fix"
              filename={`first-time-fix-funnel-${opened ? `${opened.key}-` : ""}${d.period.key}.csv`}
              hidden={d.groupHidden}
              footer={
                <p>
                  {chart.points.length < rows.length && `Not plotted (fewer than 30 complaints): ${rows.filter((r) => !chart.points.some((p) => p.key === r.key)).map((r) => r.label).join(", ")}. `}
                  Each dot is a {opened ? "technician" : "shop"} at its number of complaints; a label moved off its dot is joined to it by a thin line.
                </p>
              }
            />
            <section aria-label="First-time fix and cycle time" className="min-w-0 rounded-lg border border-line bg-card p-4 shadow-sm">
              <div className="mb-2 flex flex-wrap items-start justify-between gap-2">
                <h2 className="text-base font-semibold">First-time fix and repair-order cycle time — {d.period.label}</h2>
                <button type="button" onClick={() => downloadText(`first-time-fix-cycle-${d.period.key}.csv`, fixCycleCsv(d))} className="rounded border border-line px-2 py-1 text-sm hover:bg-paper">
                  CSV
                </button>
              </div>
              <p className="text-sm">
                {d.group ? `Group first-time fix ${fm.value(d.group.firstTimeFix)} of ${fm.count(d.group.funnel.complaints)} complaints. ` : `${d.groupHidden} `}
                {d.group && (below.length === 0 ? "No shop is below the funnel around it." : below.map((s) => `${s.label}: ${s.words}.`).join(" "))}
              </p>
              <div className="mt-2 overflow-x-auto">
                <table className="w-full min-w-[860px] text-left text-sm">
                  <thead className="text-muted">
                    <tr>
                      <th scope="col" className="border-b border-line px-2 py-1">Shop / technician</th>
                      <th scope="col" className="border-b border-line px-2 py-1">Complaints → no return for parts → no comeback</th>
                      <th scope="col" className="border-b border-line px-2 py-1">First-time fix</th>
                      <th scope="col" className="border-b border-line px-2 py-1">Funnel</th>
                      <th scope="col" className="border-b border-line px-2 py-1">Cycle, median (95 % interval) · p90</th>
                      <th scope="col" className="border-b border-line px-2 py-1">Of it waiting for parts</th>
                    </tr>
                  </thead>
                  <tbody>
                    {d.group && <Row r={d.group} group />}
                    {d.shops.map((s) => (
                      <Fragment key={s.key}>
                        <Row r={s} />
                        {s.technicians.length > 0 && (
                          <tr>
                            <td colSpan={6} className="px-2 py-0.5">
                              <button type="button" className="text-xs underline" aria-expanded={open === s.key} onClick={() => setOpen(open === s.key ? null : s.key)}>
                                {open === s.key ? "Hide" : "Show"} the technicians of {s.key}
                              </button>
                            </td>
                          </tr>
                        )}
                        {open === s.key && s.technicians.map((t) => <Row key={t.key} r={t} sub />)}
                      </Fragment>
                    ))}
                  </tbody>
                </table>
              </div>
              <p className="mt-2 text-xs text-muted">{d.method}</p>
            </section>
          </div>
        );
      }}
    </QueryView>
  );
}
