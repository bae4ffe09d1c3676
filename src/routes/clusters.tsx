import { useQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import { clusterQueries } from "@/features/clusters/api/cluster-queries";
import { RatioStrip } from "@/features/clusters/components/ratio-strip";
import { FilterBar } from "@/features/filters/components/filter-bar";
import { QueryView } from "@/features/filters/components/query-view";
import { readFilters, useFilters } from "@/features/filters/use-filters";
import type { PrimeCache } from "@/app/page-loader";

const fmt = (v: number) => (v >= 10 ? v.toFixed(0) : v >= 1 ? v.toFixed(1) : v.toFixed(2));

// prefetched, not awaited: the cluster scan is the heaviest analysis; the page shows its skeleton meanwhile
export const primeCache: PrimeCache = (qc, { url }) => {
  void qc.prefetchQuery(clusterQueries.list(readFilters(url.searchParams).search));
};

export function Component() {
  const { filters, search } = useFilters();
  // the scan picks its own components (the cold-start aids) unless the filter names one
  const q = useQuery(clusterQueries.list(search));
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Clusters</h1>
        <p className="text-muted">Groups of failures that stand above what their engine hours and weather would lead us to expect, most surprising first.</p>
      </div>
      <FilterBar />
      <QueryView
        query={q}
        label="clusters"
        lines={8}
        isEmpty={(d) => d.clusters.length === 0}
        emptyTitle="No cluster stands out"
        emptyText={`None of the ${filters.components.length ? "chosen components" : "cold-start aids"} shows more failures than expected with these filters (q below the threshold). Widen the dates or shops to look again.`}
      >
        {(d) => (
          <>
            <ol className="space-y-2" aria-label="Ranked clusters">
              {d.clusters.map((c) => (
                <li key={c.id} className="rounded-lg border border-line bg-card p-3 shadow-sm">
                  <div className="flex flex-wrap items-start gap-3">
                    <span className="grid h-8 w-8 shrink-0 place-items-center rounded-full bg-slate text-sm font-bold text-paper">{c.rank}</span>
                    <div className="min-w-0 flex-1">
                      <Link to={`/clusters/${c.id}${search ? `?${search}` : ""}`} className="font-semibold text-ink hover:text-accent hover:underline">
                        {c.description}
                      </Link>
                      <div className="mt-2 grid items-center gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_auto_1fr_auto]">
                        <span><span className="text-muted">Observed</span> <b className="tabular-nums">{c.observed}</b></span>
                        <span><span className="text-muted">Expected</span> <b className="tabular-nums">{fmt(c.expected)}</b></span>
                        <RatioStrip ratio={c.ratio} lower={c.lower} upper={c.upper} />
                        <span className="tabular-nums">×{c.ratio.toFixed(1)} <span className="text-muted">({c.lower.toFixed(1)}–{c.upper.toFixed(1)}), q {c.qValue < 0.001 ? "< 0.001" : c.qValue.toFixed(3)}</span></span>
                      </div>
                    </div>
                  </div>
                </li>
              ))}
            </ol>
            <div className="rounded-lg border border-line bg-card p-3 text-xs text-muted">
              <p><b>How:</b> {d.method} {d.cellsTested.toLocaleString("en-US")} cells tested; clusters with q below {d.qThreshold}.</p>
              <p className="mt-1"><b>Caution:</b> {d.caution}</p>
            </div>
          </>
        )}
      </QueryView>
    </div>
  );
}
