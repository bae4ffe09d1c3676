import { useQuery } from "@tanstack/react-query";
import { EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { claimQueries } from "@/features/claims/api/claim-queries";
import { DeadlineBadge, money, num } from "@/features/claims/components/deadline-badge";

/** Closed failure lines inside their machine's cover that no claim holds yet, nearest deadline first. */
export function UnclaimedLines({ onPick }: { onPick: (id: string) => void }) {
  const q = useQuery(claimQueries.candidates());
  if (q.isPending) return <Skeleton lines={5} label="Loading unclaimed repair lines" />;
  if (q.isError) return <ErrorNotice error={q.error} onRetry={() => q.refetch()} />;
  if (q.data.candidates.length === 0) return <EmptyState title="Every covered repair line has a claim" />;
  return (
    <div className="max-h-96 overflow-auto">
      <table className="w-full text-left text-sm" aria-label="Unclaimed repair lines in warranty">
        <thead className="sticky top-0 border-b border-line bg-card text-xs text-muted">
          <tr><th className="py-1">Deadline</th><th>RO / line</th><th>Shop</th><th>Machine</th><th>Component</th><th className="text-right">Hours</th><th className="pl-3">Billed as</th><th className="text-right">Parts + labour</th><th /></tr>
        </thead>
        <tbody>
          {q.data.candidates.map((c) => (
            <tr key={c.repairLineId} className="border-b border-line/50" title={c.eligibility}>
              <td className="py-1"><DeadlineBadge deadline={c.deadline} /></td>
              <td>{c.roNumber}/{c.lineNo}</td>
              <td>{c.shopCode}</td>
              <td>{c.serial} <span className="text-muted">{c.modelLine}</span></td>
              <td>{c.component}</td>
              <td className="text-right tabular-nums">{num(c.hourMeter, 0)}</td>
              <td className={`pl-3 ${c.payType === "warranty" ? "" : "font-semibold text-alert"}`}>{c.payType}</td>
              <td className="text-right tabular-nums">{money(c.amount)}</td>
              <td className="pl-2 text-right">
                <button type="button" onClick={() => onPick(c.repairLineId)} className="rounded bg-slate px-2 py-0.5 text-xs text-paper" aria-label={`Claim RO ${c.roNumber}/${c.lineNo}`}>Claim</button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-2 text-xs text-muted">Closed failure lines inside the machine's cover that no claim holds yet. A line billed to the customer or internally while in cover is money the group may be owed.</p>
    </div>
  );
}
