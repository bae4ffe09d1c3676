import { useQuery } from "@tanstack/react-query";
import { Link, useNavigate } from "react-router-dom";
import { ClaimQueueTable } from "@/features/claims/components/claim-queue-table";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { claimQueries } from "@/features/claims/api/claim-queries";
import { DeadlineBadge, StatusPill } from "@/features/claims/components/deadline-badge";
import { ClaimMoneySection } from "@/features/claims/components/claim-money";
import type { PrimeCache } from "@/app/page-loader";
import type { ClaimSummary } from "@shared/schemas/claims";
import type { ClaimBucket } from "@shared/schemas/claim-lifecycle";
import { useFormat } from "@/lib/use-format";

// the claim list is awaited (a short table; a refusal reaches the claims area's error boundary); the queue of
// unclaimed lines and the money below it are prefetched, not awaited
export const primeCache: PrimeCache = (qc) => {
  void qc.prefetchQuery(claimQueries.candidates("page=1&pageSize=25&sort=deadline&dir=asc"));
  void qc.prefetchQuery(claimQueries.money());
  return qc.ensureQueryData(claimQueries.list());
};

const buckets: { key: ClaimBucket; title: string; hint: string; empty: string }[] = [
  { key: "toFile", title: "To file", hint: "Drafts, the nearest deadline first; overdue ones after those still in time.", empty: "Nothing waits to be filed." },
  { key: "waiting", title: "Waiting for the maker", hint: "Submitted, the longest waiting first.", empty: "No claim waits on the maker." },
  { key: "rejected", title: "Rejected, open for resubmission", hint: "Correct one as a new version, or write it off.", empty: "No rejected claim is open." },
  { key: "closed", title: "Closed", hint: "Paid, written off, or corrected by a later version.", empty: "No claim is closed yet." },
];

function when(c: ClaimSummary) {
  if (c.bucket === "toFile") return <DeadlineBadge deadline={c.deadline} />;
  if (c.filing?.filedOn) return <span className="text-xs">filed {c.filing.filedOn}{c.filing.daysLate ? <span className="text-alert"> ({c.filing.daysLate} days late)</span> : null}</span>;
  return <span className="text-xs text-muted">deadline {c.deadline.deadline}</span>;
}

function ClaimRows({ claims, label }: { claims: readonly ClaimSummary[]; label: string }) {
  const f = useFormat();
  return (
    <div className="overflow-x-auto">
    <table className="w-full text-left text-sm" aria-label={label}>
      <thead className="border-b border-line text-xs text-muted">
        <tr><th className="py-2">Claim</th><th>What</th><th>Shop</th><th>Status</th><th>When</th><th className="text-right">Lines</th><th className="text-right">Claimed</th><th className="text-right">Paid</th></tr>
      </thead>
      <tbody>
        {claims.map((c) => (
          <tr key={c.id} className="border-b border-line/60 align-top">
            <td className="whitespace-nowrap py-2 font-semibold">
              <Link to={`/claims/${c.id}`} className="text-accent hover:underline">{c.claimNumber}</Link>
              {c.revision > 1 && <span className="text-xs text-muted"> v{c.revision}</span>}
            </td>
            <td className="max-w-md">{c.title}</td>
            <td>{c.shopCode ?? "several"}</td>
            <td><StatusPill status={c.status} />{c.supersededBy && <span className="block text-xs text-muted">corrected</span>}</td>
            <td>{when(c)}</td>
            <td className="text-right tabular-nums">{c.lineCount}</td>
            <td className="text-right tabular-nums">{f.money(c.amountClaimed)}</td>
            <td className="text-right tabular-nums">{f.money(c.amountCredited ?? c.amountPaid)}</td>
          </tr>
        ))}
      </tbody>
    </table>
    </div>
  );
}

export function Component() {
  const f = useFormat();
  const q = useQuery(claimQueries.list());
  const navigate = useNavigate();
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">Warranty claims</h1>
          <p className="text-muted">The week's work by urgency: what to file, what waits on the maker, what came back rejected.</p>
        </div>
        <Link to="/claims/new" className="rounded bg-accent px-3 py-2 text-sm font-semibold text-white">New claim</Link>
      </div>
      {q.isPending ? (
        <Card><Skeleton lines={6} label="Loading claims" /></Card>
      ) : q.isError ? (
        <Card><ErrorNotice error={q.error} onRetry={() => q.refetch()} /></Card>
      ) : q.data.claims.length === 0 ? (
        <Card><EmptyState title="No claims yet">Open one from a repair line, or a campaign case from a cluster, with New claim.</EmptyState></Card>
      ) : (
        <>
          <div className="grid grid-cols-2 gap-3 lg:grid-cols-4" aria-label="Claims by urgency">
            {buckets.map((b) => (
              <a key={b.key} href={`#bucket-${b.key}`} className="rounded-lg border border-line bg-card p-3 shadow-sm hover:border-accent">
                <p className="text-xs text-muted">{b.title}</p>
                <p className="text-2xl font-bold tabular-nums">{f.count(q.data.buckets[b.key].count)}</p>
                <p className="text-sm tabular-nums">{f.money(q.data.buckets[b.key].amount)} {b.key === "closed" ? "claimed" : "at stake"}</p>
              </a>
            ))}
          </div>
          {buckets.map((b) => {
            const rows = q.data.claims.filter((c) => c.bucket === b.key);
            return (
              <section key={b.key} id={`bucket-${b.key}`}>
                <Card title={`${b.title} (${rows.length})`}>
                  <p className="mb-2 text-xs text-muted">{b.hint}</p>
                  {rows.length ? <ClaimRows claims={rows} label={b.title} /> : <p className="text-sm text-muted">{b.empty}</p>}
                </Card>
              </section>
            );
          })}
        </>
      )}
      <Card title="Money: claimed, paid and written off"><ClaimMoneySection /></Card>
      <Card title="Repair lines in warranty, not yet claimed">
        <ClaimQueueTable onPick={(id) => navigate(`/claims/new?repairLine=${encodeURIComponent(id)}`)} />
      </Card>
    </div>
  );
}
