import { useState } from "react";
import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { findingQueries } from "@/features/clusters/api/finding-queries";
import { meQueries } from "@/features/session/api/me-queries";
import { findingReadRoles } from "@shared/roles";
import { Link } from "react-router-dom";
import { clusterQueries } from "@/features/clusters/api/cluster-queries";
import { ClusterFigures, FindingCard } from "@/features/clusters/components/finding-card";
import { currentTemperatureUnit, useTemperatureUnit } from "@/features/filters/hooks/use-temperature-unit";
import { FilterBar } from "@/features/filters/components/filter-bar";
import { QueryView } from "@/features/filters/components/query-view";
import { readFilters, useFilters } from "@/features/filters/use-filters";
import type { PrimeCache } from "@/app/page-loader";
import { useFormat } from "@/lib/use-format";

// prefetched, not awaited: the cluster scan is the heaviest analysis; the page shows its skeleton meanwhile
export const primeCache: PrimeCache = (qc, { url }) => {
  void qc.prefetchQuery(clusterQueries.list(readFilters(url.searchParams).search, currentTemperatureUnit()));
};

export function Component() {
  const fmt = useFormat();
  const { filters, search } = useFilters();
  // the scan picks its own components (the cold-start aids) unless the filter names one
  const [unit] = useTemperatureUnit();
  const q = useQuery(clusterQueries.list(search, unit));
  const { data: me } = useSuspenseQuery(meQueries.current());
  const readsFindings = (me?.roles ?? []).some((r) => (findingReadRoles as readonly string[]).includes(r));
  const states = useQuery({ ...findingQueries.states(), enabled: readsFindings });
  const stateOf = new Map((states.data?.states ?? []).map((s) => [s.key, s]));
  const [showDismissed, setShowDismissed] = useState(false);
  // a dismissed finding stays out of the list unless it has grown since, or the user asks to see it
  const hidden = (key: string) => { const s = stateOf.get(key); return !!s && s.status === "dismissed" && !s.grewSinceDismissed && !showDismissed; };
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Clusters</h1>
        <p className="text-muted">
          Findings: failures that stand above what their engine hours and weather would lead us to expect, one entry per underlying signal, most surprising first.
        </p>
      </div>
      <FilterBar />
      <QueryView
        query={q}
        label="clusters"
        lines={8}
        isEmpty={(d) => d.findings.length === 0}
        emptyTitle="No cluster stands out"
        emptyText={`None of the ${filters.components.length ? "chosen components" : "cold-start aids"} shows more failures than expected with these filters (q below the threshold). Widen the dates or shops to look again.`}
      >
        {(d) => (
          <>
            <ol className="space-y-3" aria-label="Findings">
              {d.findings.filter((f) => !hidden(f.key)).map((f) => (
                <li key={f.id}>
                  <FindingCard f={f} search={search} state={stateOf.get(f.key)} />
                </li>
              ))}
            </ol>
            {d.findings.some((f) => stateOf.get(f.key)?.status === "dismissed") && (
              <label className="flex items-center gap-2 text-sm">
                <input type="checkbox" checked={showDismissed} onChange={(e) => setShowDismissed(e.target.checked)} className="h-4 w-4" />
                Show dismissed findings ({d.findings.filter((f) => stateOf.get(f.key)?.status === "dismissed").length})
              </label>
            )}
            <details className="rounded-lg border border-line bg-card p-3">
              <summary className="cursor-pointer text-sm font-semibold">Every cluster behind the findings ({d.clusters.length})</summary>
              <ol className="mt-2 space-y-2" aria-label="Ranked clusters">
                {d.clusters.map((c) => (
                  <li key={c.id} className="rounded border border-line/70 p-2">
                    <span className="mr-2 font-bold tabular-nums">{c.rank}.</span>
                    <Link to={`/clusters/${c.id}${search ? `?${search}` : ""}`} className="text-ink hover:text-accent hover:underline">
                      {c.description}
                    </Link>
                    <div className="mt-1">
                      <ClusterFigures c={c} />
                    </div>
                  </li>
                ))}
              </ol>
            </details>
            <div className="rounded-lg border border-line bg-card p-3 text-xs text-muted">
              <p><b>How:</b> {d.method} {fmt.count(d.cellsTested)} cells tested; clusters with q below {d.qThreshold}.</p>
              <p className="mt-1"><b>Caution:</b> {d.caution}</p>
            </div>
          </>
        )}
      </QueryView>
    </div>
  );
}
