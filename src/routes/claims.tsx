import { useQuery } from "@tanstack/react-query";
import { Link, useNavigate } from "react-router-dom";
import { ClaimQueueTable } from "@/features/claims/components/claim-queue-table";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { claimQueries } from "@/features/claims/api/claim-queries";
import { DeadlineBadge, StatusPill, money } from "@/features/claims/components/deadline-badge";
import type { PrimeCache } from "@/app/page-loader";

// the claim list is awaited (a short table; a refusal reaches the claims area's error boundary); the queue of
// unclaimed lines below it is prefetched, not awaited, since it judges eligibility line by line
export const primeCache: PrimeCache = (qc) => {
  void qc.prefetchQuery(claimQueries.candidates("page=1&pageSize=25&sort=deadline&dir=asc"));
  return qc.ensureQueryData(claimQueries.list());
};

export function Component() {
  const q = useQuery(claimQueries.list());
  const navigate = useNavigate();
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">Warranty claims</h1>
          <p className="text-muted">Drafts nearest their filing deadline come first; claims already with the maker follow.</p>
        </div>
        <Link to="/claims/new" className="rounded bg-accent px-3 py-2 text-sm font-semibold text-white">New claim</Link>
      </div>
      <Card>
        {q.isPending ? (
          <Skeleton lines={6} label="Loading claims" />
        ) : q.isError ? (
          <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
        ) : q.data.claims.length === 0 ? (
          <EmptyState title="No claims yet">Open one from a repair line, or a campaign case from a cluster, with New claim.</EmptyState>
        ) : (
          <table className="w-full text-left text-sm" aria-label="Claims queue">
            <thead className="border-b border-line text-xs text-muted">
              <tr><th className="py-2">Claim</th><th>What</th><th>Shop</th><th>Status</th><th>Deadline</th><th className="text-right">Lines</th><th className="text-right">Claimed</th><th className="pl-3">Sent</th></tr>
            </thead>
            <tbody>
              {q.data.claims.map((c) => (
                <tr key={c.id} className="border-b border-line/60 align-top">
                  <td className="py-2 font-semibold"><Link to={`/claims/${c.id}`} className="text-accent hover:underline">{c.claimNumber}</Link></td>
                  <td className="max-w-md">{c.title}</td>
                  <td>{c.shopCode ?? "several"}</td>
                  <td><StatusPill status={c.status} /></td>
                  <td>{c.status === "draft" ? <DeadlineBadge deadline={c.deadline} /> : <span className="text-muted">{c.deadline.deadline}</span>}</td>
                  <td className="text-right tabular-nums">{c.lineCount}</td>
                  <td className="text-right tabular-nums">{money(c.amountClaimed)}</td>
                  <td className="pl-3 text-xs">{c.lastSend ? c.lastSend.status : "–"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Card>
      <Card title="Repair lines in warranty, not yet claimed">
        <ClaimQueueTable onPick={(id) => navigate(`/claims/new?repairLine=${encodeURIComponent(id)}`)} />
      </Card>
    </div>
  );
}
