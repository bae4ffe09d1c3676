import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { Link, useParams, useSearchParams } from "react-router-dom";
import { Card } from "@/components/ui/states";
import { QueryView } from "@/features/filters/components/query-view";
import { batchQueries } from "@/features/imports/api/batch-queries";
import { BatchSummary } from "@/features/imports/components/batch-summary";
import { RejectTable } from "@/features/imports/components/reject-table";
import { RejectPager } from "@/features/imports/components/reject-pager";
import { readRejectParams } from "@/features/imports/reject-params";
import { reasonLabel } from "@/features/imports/import-words";
import { pagePaths } from "@/app/page-paths";
import type { PrimeCache } from "@/app/page-loader";
import { apiPaths } from "@shared/api-paths";
import { useFormat } from "@/lib/use-format";

// awaited: one page of one batch is a quick look-up, and a batch that is missing or outside the caller's
// shops reaches the area's error boundary before the page draws
export const primeCache: PrimeCache = (qc, { params, url }) => qc.ensureQueryData(batchQueries.rejects(params.id ?? "", readRejectParams(url.searchParams).pageSearch));

export function Component() {
  const fmt = useFormat();
  const id = useParams().id!;
  const [params, setParams] = useSearchParams();
  const { reason, offset, limit, pageSearch, csvSearch } = readRejectParams(params);
  const q = useQuery({ ...batchQueries.rejects(id, pageSearch), placeholderData: keepPreviousData });
  const set = (next: Record<string, string | number | undefined>) => {
    const p = new URLSearchParams(params);
    for (const [k, v] of Object.entries(next)) (v === undefined || v === "" || v === 0 ? p.delete(k) : p.set(k, String(v)));
    setParams(p, { replace: true });
  };

  return (
    <div className="space-y-4">
      <div>
        <p className="text-sm"><Link to={pagePaths.imports} className="text-accent hover:underline">Imports</Link> ›</p>
        <h1 className="text-2xl font-bold">Rejects of batch {id}</h1>
        <p className="text-muted">The rows this load turned away, with why and the fields as the file wrote them. Fix them in the shop's system and load the export again.</p>
      </div>
      <QueryView query={q} label="the batch" lines={8}>
        {(page) => (
          <>
            <Card title="Summary">
              <BatchSummary batch={page.batch} />
            </Card>
            <Card title="Rejected rows">
              <div className="mb-3 flex flex-wrap items-end gap-3">
                <label className="text-sm">
                  <span className="block font-semibold">Reason</span>
                  <select value={reason} onChange={(e) => set({ reason: e.target.value, offset: undefined })} className="mt-1 max-w-full rounded border border-line bg-white px-2 py-1">
                    <option value="">Every reason ({fmt.count(page.reasons.reduce((n, r) => n + r.count, 0))})</option>
                    {reason && !page.reasons.some((r) => r.code === reason) && <option value={reason}>{reasonLabel(reason)} (0)</option>}
                    {page.reasons.map((r) => <option key={r.code} value={r.code}>{reasonLabel(r.code)} ({fmt.count(r.count)})</option>)}
                  </select>
                </label>
                <a href={apiPaths.batchRejectsCsv(id, csvSearch)} download={`batch-${id}-rejects.csv`} className="ml-auto rounded border border-line bg-white px-3 py-1.5 text-sm hover:border-accent">
                  Download CSV{reason ? ` (${reasonLabel(reason)})` : ""}
                </a>
              </div>
              {page.total === 0 ? (
                <p className="text-sm text-muted">{reason ? "No rejects with this reason." : "This load rejected no rows."}</p>
              ) : (
                <RejectTable page={page} loading={q.isPlaceholderData} />
              )}
              <RejectPager offset={offset} limit={limit} total={page.total} loading={q.isPlaceholderData} onOffset={(o) => set({ offset: o })} onLimit={(l) => set({ limit: l === 100 ? undefined : l, offset: undefined })} />
            </Card>
          </>
        )}
      </QueryView>
    </div>
  );
}
