import { useQuery } from "@tanstack/react-query";
import { Link, generatePath } from "react-router-dom";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { pagePaths } from "@/app/page-paths";
import { profileQueries } from "@/features/admin/profiles/api/profile-queries";
import { dateTimeInWords, kindLabels } from "@/features/imports/import-words";
import { useFormat } from "@/lib/use-format";

// awaited: a short list, and someone who is not an administrator reaches the area's error boundary
export const primeCache: PrimeCache = (qc) => qc.ensureQueryData(profileQueries.list());

export function Component() {
  const fmt = useFormat();
  const q = useQuery(profileQueries.list());
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Export profiles</h1>
        <p className="text-muted">
          How each shop system writes its exports: layout, units and codes. Every edit is kept as a new version; each load records the version that read it.
        </p>
      </div>
      <Card>
        {q.isPending ? (
          <Skeleton />
        ) : q.isError ? (
          <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
        ) : q.data.profiles.length === 0 ? (
          <EmptyState title="No profiles yet" />
        ) : (
          <ul className="divide-y divide-line" aria-label="Export profiles">
            {q.data.profiles.map((p) => (
              <li key={p.id} className="flex flex-wrap items-baseline justify-between gap-2 py-2">
                <div className="min-w-0">
                  <Link to={generatePath(pagePaths.adminProfile, { id: p.id })} className="font-mono font-semibold text-accent underline">
                    {p.id}
                  </Link>
                  <span className="ml-2 text-sm text-muted">{kindLabels[p.kind]}</span>
                  <p className="text-sm">{p.description}</p>
                </div>
                <p className="text-xs text-muted">
                  version {p.latest.version}
                  {p.isDefault ? " (as shipped)" : `, saved by ${p.latest.savedBy} ${dateTimeInWords(p.latest.savedAt)}`} · {fmt.count(p.batches)}{" "}
                  {p.batches === 1 ? "load" : "loads"}
                </p>
              </li>
            ))}
          </ul>
        )}
      </Card>
    </div>
  );
}
