import { Fragment, useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { QueryView } from "@/features/filters/components/query-view";
import type { FixRow } from "@shared/schemas/benchmark-details";
import type { FunnelStatus } from "@shared/schemas/benchmarks";
import { benchmarkQueries, type BenchmarkParams } from "../api/benchmark-queries";
import { days, intervalText, pct, valueText } from "../format";

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
  const f = r.funnel;
  return (
    <tr className={group ? "bg-paper/60 font-medium" : sub ? "text-xs" : ""}>
      <th scope="row" className={`border-b border-line/60 px-2 py-1.5 text-left font-semibold ${sub ? "pl-6 font-normal" : ""}`}>{r.label}</th>
      <td className="border-b border-line/60 px-2 py-1.5 tabular-nums">
        {f.complaints} → {f.noReturn} → {f.fixed}
      </td>
      <td className="border-b border-line/60 px-2 py-1.5 tabular-nums">
        <span className="block">{valueText(r.firstTimeFix)}</span>
        <span className="block text-xs text-muted">{intervalText(r.firstTimeFix)}</span>
      </td>
      <td className="border-b border-line/60 px-2 py-1.5">
        {group ? "—" : <span className={`rounded px-1.5 py-0.5 text-xs font-semibold ${statusClass[r.status]}`} title={r.words}>{statusText[r.status]}</span>}
      </td>
      <td className="border-b border-line/60 px-2 py-1.5 tabular-nums">
        {days(r.cycle.median)} · {days(r.cycle.p90)}
        <span className="block text-xs text-muted">{r.cycle.orders} ROs</span>
      </td>
      <td className="border-b border-line/60 px-2 py-1.5 tabular-nums">
        {pct(r.cycle.waitingShare)}
        <span className="block text-xs text-muted">{r.cycle.ordersWaiting} ROs waited · median {days(r.cycle.medianWaiting)}</span>
      </td>
    </tr>
  );
}

/** First-time fix with its funnel (complaints → no return for parts → no comeback) and RO cycle time, per shop and technician. */
export function FixCycleSection({ params }: { params: BenchmarkParams }) {
  const q = useQuery(benchmarkQueries.fixCycle(params));
  const [open, setOpen] = useState<string | null>(null);
  return (
    <QueryView query={q} label="first-time fix and cycle time" lines={6}>
      {(d) => {
        const below = d.shops.filter((s) => s.status.startsWith("below"));
        return (
          <section aria-label="First-time fix and cycle time" className="min-w-0 rounded-lg border border-line bg-card p-4 shadow-sm">
            <h2 className="text-base font-semibold">First-time fix and repair-order cycle time — {d.period.label}</h2>
            <p className="text-sm">
              Group first-time fix {valueText(d.group.firstTimeFix)} of {d.group.funnel.complaints} complaints.{" "}
              {below.length === 0 ? "No shop is below the funnel around it." : below.map((s) => `${s.label}: ${s.words}.`).join(" ")}
            </p>
            <div className="mt-2 overflow-x-auto">
              <table className="w-full min-w-[760px] text-left text-sm">
                <thead className="text-muted">
                  <tr>
                    <th scope="col" className="border-b border-line px-2 py-1">Shop / technician</th>
                    <th scope="col" className="border-b border-line px-2 py-1">Complaints → no return for parts → no comeback</th>
                    <th scope="col" className="border-b border-line px-2 py-1">First-time fix</th>
                    <th scope="col" className="border-b border-line px-2 py-1">Funnel</th>
                    <th scope="col" className="border-b border-line px-2 py-1">Cycle, median · p90</th>
                    <th scope="col" className="border-b border-line px-2 py-1">Of it waiting for parts</th>
                  </tr>
                </thead>
                <tbody>
                  <Row r={d.group} group />
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
        );
      }}
    </QueryView>
  );
}
