import { useState } from "react";
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { columnVisibilityFeature, createColumnHelper, rowSortingFeature, tableFeatures, useTable, type SortingState } from "@tanstack/react-table";
import { ErrorNotice, Skeleton } from "@/components/ui/states";
import { SortedTable } from "@/components/sorted-table";
import { claimQueries } from "@/features/claims/api/claim-queries";
import { shopQueries } from "@/features/filters/api/shop-queries";
import { meQueries } from "@/features/session/api/me-queries";
import { DeadlineBadge } from "@/features/claims/components/deadline-badge";
import { CANDIDATE_PAGE_SIZES, type ClaimCandidatePage, type ClaimCandidateQuery } from "@shared/schemas/claims";
import { components, engineFamilies } from "@shared/catalog";
import { useFormat } from "@/lib/use-format";

type Row = ClaimCandidatePage["rows"][number];
type SortKey = ClaimCandidateQuery["sort"];
const features = tableFeatures({ rowSortingFeature, columnVisibilityFeature });
const col = createColumnHelper<typeof features, Row>();

const DAYS_LEFT: { value: string; label: string }[] = [
  { value: "", label: "Any" },
  { value: "0", label: "Due today or overdue" },
  { value: "7", label: "7 days or fewer" },
  { value: "14", label: "14 days or fewer" },
  { value: "30", label: "30 days or fewer" },
];

interface Filters {
  q: string;
  shop: string;
  component: string;
  engineFamily: string;
  daysLeft: string;
}
const none: Filters = { q: "", shop: "", component: "", engineFamily: "", daysLeft: "" };

/**
 * The clerk's queue of covered, unclaimed repair lines: paged, sorted and filtered on the server, searched by
 * serial or repair-order number; a claim starts from any row. A search that names lines outside the queue says
 * where they are.
 */
export function ClaimQueueTable({ onPick }: { onPick: (id: string) => void }) {
  const f = useFormat();
  const me = useQuery(meQueries.current());
  const scope = me.data?.scope;
  const canFilterShops = scope?.kind === "all" || (scope?.kind === "shops" && scope.shops.length > 1);
  const [filters, setFilters] = useState<Filters>(none);
  const [text, setText] = useState("");
  const [page, setPage] = useState(1);
  const [pageSize, setPageSize] = useState(25);
  const [sort, setSort] = useState<{ id: SortKey; desc: boolean }>({ id: "deadline", desc: false });
  const params = new URLSearchParams({ page: String(page), pageSize: String(pageSize), sort: sort.id, dir: sort.desc ? "desc" : "asc" });
  for (const [k, v] of Object.entries(filters)) if (v) params.set(k, v);
  const list = useQuery({ ...claimQueries.candidates(params.toString()), placeholderData: keepPreviousData });
  const shops = useQuery({ ...shopQueries.list(), enabled: canFilterShops });
  const set = (next: Partial<Filters>) => {
    setFilters((f) => ({ ...f, ...next }));
    setPage(1);
  };
  const columns = col.columns([
    col.accessor("deadline", { id: "deadline", header: "Deadline", cell: (i) => <DeadlineBadge deadline={i.getValue()} /> }),
    col.accessor("roNumber", { id: "ro", header: "RO / line", enableSorting: false, cell: (i) => `${i.getValue()}/${i.row.original.lineNo}` }),
    col.accessor("shopCode", { id: "shop", header: "Shop" }),
    col.accessor("serial", { id: "serial", header: "Machine", cell: (i) => <>{i.getValue()} <span className="text-muted">{i.row.original.modelLine}</span></> }),
    col.accessor("engineFamily", { id: "family", header: "Engine family", enableSorting: false }),
    col.accessor("component", { id: "component", header: "Component" }),
    col.accessor("hourMeter", { id: "hours", header: "Hour meter (h)", enableSorting: false, cell: (i) => f.quantity("hours", i.getValue()) }),
    col.accessor("payType", { id: "pay", header: "Billed as", enableSorting: false, cell: (i) => <span className={i.getValue() === "warranty" ? "" : "font-semibold text-alert"}>{i.getValue()}</span> }),
    col.accessor("closedDate", { id: "closed", header: "Closed" }),
    col.accessor("amount", { id: "amount", header: "Parts + labour", cell: (i) => f.money(i.getValue()) }),
    col.display({
      id: "claim",
      header: "",
      cell: (i) => (
        <button type="button" onClick={() => onPick(i.row.original.repairLineId)} className="rounded bg-slate px-2 py-0.5 text-xs text-paper" aria-label={`Claim RO ${i.row.original.roNumber}/${i.row.original.lineNo}`}>
          Claim
        </button>
      ),
    }),
  ]);
  const sorting: SortingState = [{ id: sort.id, desc: sort.desc }];
  const table = useTable({
    features,
    columns,
    data: list.data?.rows ?? [],
    getRowId: (r) => r.repairLineId,
    manualSorting: true,
    enableSortingRemoval: false,
    state: { sorting },
    onSortingChange: (u) => {
      const next = typeof u === "function" ? u(sorting) : u;
      if (next[0]) {
        setSort({ id: next[0].id as SortKey, desc: next[0].desc });
        setPage(1);
      }
    },
  });
  const select = (label: string, value: string, onChange: (v: string) => void, options: { value: string; label: string }[]) => (
    <label className="min-w-0 text-xs font-semibold text-muted">
      {label}
      <select value={value} onChange={(e) => onChange(e.target.value)} className="mt-0.5 block w-full rounded border border-line bg-white px-1 py-1 text-sm font-normal text-ink">
        {options.map((o) => <option key={o.value} value={o.value}>{o.label}</option>)}
      </select>
    </label>
  );
  const d = list.data;
  const pages = d ? Math.max(1, Math.ceil(d.total / d.pageSize)) : 1;
  return (
    <div className="min-w-0 space-y-3">
      <form
        role="search"
        aria-label="Find a repair line to claim"
        className="flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          set({ q: text.trim() });
        }}
      >
        <label className="min-w-56 flex-1 text-xs font-semibold text-muted">
          Serial or repair-order number
          <input value={text} onChange={(e) => setText(e.target.value)} placeholder="e.g. the machine's serial, or the RO number" className="mt-0.5 block w-full rounded border border-line bg-white px-2 py-1 text-sm font-normal text-ink" />
        </label>
        <button type="submit" className="rounded bg-slate px-3 py-1.5 text-sm text-paper">Find</button>
        {filters.q && (
          <button type="button" onClick={() => { setText(""); set({ q: "" }); }} className="rounded border border-line px-3 py-1.5 text-sm">
            Clear search
          </button>
        )}
      </form>
      <div className="grid grid-cols-2 gap-2 sm:grid-cols-4">
        {canFilterShops && select("Shop", filters.shop, (v) => set({ shop: v }), [{ value: "", label: "All shops" }, ...(shops.data?.shops ?? []).map((s) => ({ value: s.code, label: `${s.code} ${s.name}` }))])}
        {select("Component", filters.component, (v) => set({ component: v }), [{ value: "", label: "Any" }, ...components.map((c) => ({ value: c.code, label: c.name }))])}
        {select("Engine family", filters.engineFamily, (v) => set({ engineFamily: v }), [{ value: "", label: "Any" }, ...engineFamilies.map((f) => ({ value: f.code, label: f.code }))])}
        {select("Days left to file", filters.daysLeft, (v) => set({ daysLeft: v }), DAYS_LEFT)}
      </div>
      {list.isPending ? (
        <Skeleton lines={6} label="Loading unclaimed repair lines" />
      ) : list.isError ? (
        <ErrorNotice error={list.error} onRetry={() => list.refetch()} />
      ) : (
        <>
          <p className="text-sm text-muted" aria-live="polite">
            {d!.total === 0
              ? filters.q ? `No line in the queue matches "${filters.q}".` : "No covered, unclaimed repair line matches these filters."
              : `${f.count(d!.total)} covered, unclaimed repair line${d!.total === 1 ? "" : "s"}${filters.q ? ` matching "${filters.q}"` : ""}.`}
          </p>
          {d!.elsewhere.length > 0 && (
            <div className="rounded border border-ochre/50 bg-ochre/10 p-2 text-sm" data-testid="lines-elsewhere">
              <p className="font-semibold">Lines matching the search that are not in the queue</p>
              <ul className="mt-1 list-disc pl-5">
                {d!.elsewhere.map((x) => <li key={x.repairLineId}>RO {x.roNumber}/{x.lineNo}, {x.serial} ({x.shopCode}), {x.component}: {x.why}.</li>)}
              </ul>
            </div>
          )}
          {d!.rows.length > 0 && (
            <div aria-busy={list.isPlaceholderData} className={`overflow-x-auto rounded border border-line ${list.isPlaceholderData ? "opacity-60" : ""}`}>
              <SortedTable table={table} label="Unclaimed repair lines in warranty" cellClass="whitespace-nowrap px-2 py-1.5 tabular-nums" rowTitle={(r) => r.eligibility} />
            </div>
          )}
          <nav aria-label="Queue pages" className="flex flex-wrap items-center gap-2 text-sm">
            <button type="button" disabled={page <= 1 || list.isPlaceholderData} onClick={() => setPage((p) => p - 1)} className="rounded border border-line bg-white px-3 py-1 disabled:opacity-40">Previous</button>
            <span>Page {f.count(page)} of {f.count(pages)}</span>
            <button type="button" disabled={page >= pages || list.isPlaceholderData} onClick={() => setPage((p) => p + 1)} className="rounded border border-line bg-white px-3 py-1 disabled:opacity-40">Next</button>
            <label className="ml-auto">Rows per page{" "}
              <select value={pageSize} onChange={(e) => { setPageSize(Number(e.target.value)); setPage(1); }} className="rounded border border-line bg-white px-1 py-0.5">
                {CANDIDATE_PAGE_SIZES.map((n) => <option key={n} value={n}>{n}</option>)}
              </select>
            </label>
          </nav>
          <p className="text-xs text-muted">Closed failure lines inside the machine's cover that no claim holds yet. A line billed to the customer or internally while in cover is money the group may be owed.</p>
        </>
      )}
    </div>
  );
}
