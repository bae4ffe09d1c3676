import { useQuery } from "@tanstack/react-query";
import type { PairLine, ShopBenchmark } from "@shared/schemas/benchmarks";
import { EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { downloadText, toCsv } from "@/lib/csv";
import { benchmarkQueries, type BenchmarkParams } from "../api/benchmark-queries";
import { useBenchmarkFormat } from "../hooks/use-benchmark-format";

function LineCell({ l }: { l: PairLine }) {
  const fm = useBenchmarkFormat();
  if (l.roNumber === null) return <span className="text-muted">At another shop of the group, opened {l.opened}</span>;
  return (
    <>
      <span className="block font-semibold">
        RO {l.roNumber}/{l.lineNo} {l.shopCode && <span className="font-normal text-muted">{l.shopCode}</span>}
      </span>
      <span className="block text-xs text-muted">
        {l.opened} → {l.closed ?? "open"} · {l.hourMeter === null ? "no meter" : fm.hours(l.hourMeter)} · {l.component}
      </span>
      <span className="block text-xs">{l.technician ?? "no technician"}</span>
      <span className="block text-xs text-muted">
        {l.complaint ?? "–"} / {l.cause ?? "no cause recorded"} / {l.correction ?? "–"}
      </span>
    </>
  );
}

/** The pairs of repair orders behind a shop's comeback figure, optionally for one technician. */
export function ComebackPairsPanel(props: {
  params: BenchmarkParams;
  shop: ShopBenchmark;
  technician: string | undefined;
  onTechnician: (tech: string | undefined) => void;
  onClose: () => void;
}) {
  const { params, shop, technician } = props;
  const fm = useBenchmarkFormat();
  const q = useQuery(benchmarkQueries.comebacks({ ...params, shop: shop.shopCode!, technician }));
  return (
    <section aria-label="Comeback pairs" className="rounded-lg border border-line bg-card p-4 shadow-sm">
      <div className="mb-2 flex flex-wrap items-start justify-between gap-2">
        <div>
          <h2 className="text-base font-semibold">
            Comeback pairs — {shop.label}
            {technician ? `, technician ${technician}` : ""}
          </h2>
          <p className="text-sm text-muted">
            Comeback rate {fm.share(shop.comeback)}. Each row is an original repair line and the later line that makes it a comeback.
          </p>
        </div>
        <div className="flex gap-2 text-sm">
          {q.data && (
            <button
              type="button"
              className="rounded border border-line px-2 py-1 hover:bg-paper"
              onClick={() =>
                downloadText(
                  `comebacks-${shop.shopCode}-${q.data.period.key}${technician ? `-${technician}` : ""}.csv`,
                  toCsv(
                    [
                      { key: "ro", label: "Original RO" }, { key: "closed", label: "Closed" }, { key: "tech", label: "Technician" }, { key: "component", label: "Component" },
                      { key: "back", label: "Comeback RO" }, { key: "opened", label: "Opened" }, { key: "days", label: "Days after close (d)" }, { key: "hours", label: "Engine hours after close (h)" },
                    ],
                    q.data.pairs.map((p) => ({
                      ro: p.original.roNumber === null ? "" : `${p.original.roNumber}/${p.original.lineNo}`, closed: p.original.closed, tech: p.original.technician, component: p.original.component,
                      back: p.followUp.roNumber === null ? "another shop" : `${p.followUp.roNumber}/${p.followUp.lineNo}`, opened: p.followUp.opened, days: p.daysAfterClose, hours: p.hoursAfterClose,
                    })),
                  ),
                )
              }
            >
              CSV
            </button>
          )}
          <button type="button" onClick={props.onClose} className="rounded border border-line px-2 py-1 hover:bg-paper">
            Close
          </button>
        </div>
      </div>
      {shop.technicians && shop.technicians.length > 0 && (
        <div className="mb-3 flex flex-wrap items-center gap-2 text-sm" role="group" aria-label="Technician">
          <span className="text-muted">Technician:</span>
          <button type="button" aria-pressed={!technician} onClick={() => props.onTechnician(undefined)} className={`rounded border px-2 py-0.5 ${!technician ? "border-slate bg-slate text-paper" : "border-line"}`}>
            All
          </button>
          {shop.technicians.map((t) => (
            <button
              key={t.techId}
              type="button"
              aria-pressed={technician === t.techId}
              onClick={() => props.onTechnician(t.techId)}
              className={`rounded border px-2 py-0.5 ${technician === t.techId ? "border-slate bg-slate text-paper" : t.aboveGroup ? "border-alert text-alert" : "border-line"}`}
              title={`${t.name}: ${fm.share(t.comeback)}`}
            >
              {t.techId} {t.comeback.value === null ? `(${t.comeback.n} lines)` : fm.pct(t.comeback.value)}
            </button>
          ))}
        </div>
      )}
      {q.isPending ? (
        <Skeleton lines={4} label="Loading the comeback pairs" />
      ) : q.isError ? (
        <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
      ) : q.data.pairs.length === 0 ? (
        <EmptyState title="No comebacks">None of the {q.data.lines} qualifying lines came back in this period.</EmptyState>
      ) : (
        <>
          <p className="mb-2 text-sm">
            {q.data.withComeback} of {q.data.lines} qualifying lines came back ({q.data.pairs.length} return visits).
          </p>
          <div className="max-h-[32rem] overflow-auto">
            <table className="w-full text-left text-sm">
              <thead className="sticky top-0 bg-card text-muted">
                <tr>
                  <th className="border-b border-line py-1 pr-3">Original line</th>
                  <th className="border-b border-line py-1 pr-3">Came back</th>
                  <th className="border-b border-line py-1 pr-3">After close</th>
                </tr>
              </thead>
              <tbody>
                {q.data.pairs.map((p, i) => (
                  <tr key={i} className="border-b border-line/50 align-top">
                    <td className="py-1.5 pr-3"><LineCell l={p.original} /></td>
                    <td className="py-1.5 pr-3"><LineCell l={p.followUp} /></td>
                    <td className="py-1.5 pr-3 tabular-nums">
                      {p.daysAfterClose} d
                      <span className="block text-xs text-muted">{p.hoursAfterClose === null ? "hours unknown" : fm.hours(Math.round(p.hoursAfterClose))}</span>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <p className="mt-2 text-xs text-muted">{q.data.rule}</p>
        </>
      )}
    </section>
  );
}
