import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { useSearchParams } from "react-router-dom";
import { repairQueries } from "@/features/repairs/api/repair-queries";
import { RepairTable } from "@/features/repairs/components/repair-table";
import { RepairPager } from "@/features/repairs/components/repair-pager";
import { FilterBar } from "@/features/filters/components/filter-bar";
import { QueryView } from "@/features/filters/components/query-view";
import { readFilters, useFilters } from "@/features/filters/use-filters";
import { readRepairListParams } from "@/features/repairs/repair-list-params";
import type { PrimeCache } from "@/app/page-loader";
import { apiPaths } from "@shared/api-paths";

// prefetched, not awaited: paging, sorting and searching change the URL, and the page keeps showing the
// previous rows while the next ones load (keepPreviousData) instead of freezing until they arrive.
// Paging follows the cursors the API hands out (cursor + at in the URL), so a deep page costs what the first does.
export const primeCache: PrimeCache = (qc, { url }) => {
  void qc.prefetchQuery(repairQueries.list(readRepairListParams(url.searchParams, readFilters(url.searchParams).search).listSearch));
};

export function Component() {
  const { search } = useFilters();
  const [params, setParams] = useSearchParams();
  const { q, pageSize, sort, dir, at, listSearch, csvSearch } = readRepairListParams(params, search);
  const [text, setText] = useState(q);

  const set = (next: Record<string, string | number | undefined>) => {
    const p = new URLSearchParams(params);
    for (const [k, v] of Object.entries(next)) (v === undefined || v === "" ? p.delete(k) : p.set(k, String(v)));
    setParams(p, { replace: true });
  };
  const moveTo = (cursor: string | null) => (cursor ? () => set({ cursor, at }) : null);
  const fromTop = { cursor: undefined, at: undefined };
  const list = useQuery(repairQueries.list(listSearch));

  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Repairs</h1>
        <p className="text-muted">Every repair line behind the numbers, newest first. Open a line for its measurements and the machine's hour trail.</p>
      </div>
      <FilterBar />
      <form
        role="search"
        className="flex flex-wrap items-center gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          set({ q: text.trim(), ...fromTop });
        }}
      >
        <label htmlFor="repair-search" className="text-sm font-semibold">Search</label>
        <input id="repair-search" value={text} onChange={(e) => setText(e.target.value)} placeholder="RO number, serial, complaint, cause, part or lot" className="w-80 max-w-full rounded border border-line bg-white px-2 py-1 text-sm" />
        <button type="submit" className="rounded bg-slate px-3 py-1 text-sm text-paper">Search</button>
        <a href={apiPaths.repairsCsv(csvSearch)} download="repair-lines.csv" className="ml-auto rounded border border-line bg-white px-3 py-1 text-sm hover:border-accent">
          Download CSV of these lines
        </a>
      </form>
      <QueryView
        query={list}
        label="repair lines"
        lines={10}
        isEmpty={(d) => d.total === 0}
        emptyTitle="No repair lines match"
        emptyText={q ? `Nothing matches "${q}" with these filters. Try fewer words or clear a filter.` : "No repair lines match these filters in the shops you can see."}
      >
        {(d) => (
          <RepairTable
            rows={d.rows}
            total={d.total}
            totalIsEstimate={d.totalIsEstimate}
            loading={list.isPlaceholderData}
            sort={{ id: sort, desc: dir === "desc" }}
            onSort={(s) => set({ sort: s.id, dir: s.desc ? "desc" : "asc", ...fromTop })}
            pager={
              <RepairPager
                page={d.page}
                pageSize={pageSize}
                total={d.total}
                totalIsEstimate={d.totalIsEstimate}
                loading={list.isPlaceholderData}
                onFirst={d.prevCursor ? () => set(fromTop) : null}
                onPrevious={moveTo(d.prevCursor)}
                onNext={moveTo(d.nextCursor)}
                onPageSize={(n) => set({ pageSize: n, ...fromTop })}
              />
            }
          />
        )}
      </QueryView>
    </div>
  );
}
