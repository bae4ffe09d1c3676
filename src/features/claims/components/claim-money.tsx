import { useQuery } from "@tanstack/react-query";
import { EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { claimQueries } from "@/features/claims/api/claim-queries";

import type { MoneyRow } from "@shared/schemas/claim-lifecycle";
import { useFormat } from "@/lib/use-format";

function MoneyTable({ rows, total, keyLabel, label }: { rows: readonly MoneyRow[]; total: MoneyRow; keyLabel: string; label: string }) {
  const f = useFormat();
  return (
    <div className="overflow-x-auto">
    <table className="w-full text-left text-sm" aria-label={label}>
      <thead className="border-b border-line text-xs text-muted">
        <tr><th className="py-1">{keyLabel}</th><th className="text-right">Claims</th><th className="text-right">Claimed</th><th className="text-right">Paid</th><th className="text-right">Written off</th><th className="text-right">Still open</th></tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <tr key={r.key} className="border-b border-line/50">
            <td className="py-1">{r.key}</td>
            <td className="text-right tabular-nums">{f.count(r.claims)}</td>
            <td className="text-right tabular-nums">{f.money(r.claimed)}</td>
            <td className="text-right tabular-nums text-ok">{f.money(r.paid)}</td>
            <td className="text-right tabular-nums text-alert">{f.money(r.writtenOff)}</td>
            <td className="text-right tabular-nums">{f.money(r.open)}</td>
          </tr>
        ))}
      </tbody>
      <tfoot className="font-semibold">
        <tr><td className="py-1">All</td><td className="text-right tabular-nums">{f.count(total.claims)}</td><td className="text-right tabular-nums">{f.money(total.claimed)}</td><td className="text-right tabular-nums">{f.money(total.paid)}</td><td className="text-right tabular-nums">{f.money(total.writtenOff)}</td><td className="text-right tabular-nums">{f.money(total.open)}</td></tr>
      </tfoot>
    </table>
    </div>
  );
}

/** Money claimed, paid and written off, per month each claim first went out and per engine family. */
export function ClaimMoneySection() {
  const q = useQuery(claimQueries.money());
  if (q.isPending) return <Skeleton lines={4} label="Loading the money" />;
  if (q.isError) return <ErrorNotice error={q.error} onRetry={() => q.refetch()} />;
  const m = q.data;
  if (m.total.claims === 0) return <EmptyState title="No claim has gone to the maker yet">Once a claim is submitted, what it claimed, what the maker paid and what was written off show here.</EmptyState>;
  return (
    <div className="space-y-4">
      <p className="text-xs text-muted">{m.basis}</p>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-2">
        <MoneyTable rows={m.byMonth} total={m.total} keyLabel="Month filed" label="Money by month" />
        <MoneyTable rows={m.byEngineFamily} total={m.total} keyLabel="Engine family" label="Money by engine family" />
      </div>
    </div>
  );
}
