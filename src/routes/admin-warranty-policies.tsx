import { useQuery } from "@tanstack/react-query";
import { Link, generatePath } from "react-router-dom";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { pagePaths } from "@/app/page-paths";
import { policyQueries } from "@/features/admin/warranty-policies/api/policy-queries";
import { dateTimeInWords } from "@/features/imports/import-words";
import { coverageClasses, coverageClassWords } from "@shared/schemas/warranty-policies";
import { useFormat } from "@/lib/use-format";

// awaited: a short list, and someone who is not an administrator reaches the area's error boundary
export const primeCache: PrimeCache = (qc) => qc.ensureQueryData(policyQueries.list());


export function Component() {
  const fmt = useFormat();
  const n = fmt.count;
  const q = useQuery(policyQueries.list());
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Warranty policies</h1>
        <p className="text-muted">
          Coverage, filing window, part retention and where packets go, per engine family; the group default applies to a family with no policy of its own. Every
          edit is kept as a new version, and each claim keeps the version it was judged under.
        </p>
      </div>
      <Card>
        {q.isPending ? (
          <Skeleton />
        ) : q.isError ? (
          <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
        ) : q.data.policies.length === 0 ? (
          <EmptyState title="No policies yet" />
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" aria-label="Warranty policies">
              <thead className="text-muted">
                <tr>
                  <th scope="col" className="border-b border-line px-2 py-1.5">Engine family</th>
                  {coverageClasses.map((c) => (
                    <th key={c} scope="col" className="border-b border-line px-2 py-1.5">{coverageClassWords[c]} cover</th>
                  ))}
                  <th scope="col" className="border-b border-line px-2 py-1.5 text-right">Filing window</th>
                  <th scope="col" className="border-b border-line px-2 py-1.5 text-right">Part retention</th>
                  <th scope="col" className="border-b border-line px-2 py-1.5">Packets go to</th>
                  <th scope="col" className="border-b border-line px-2 py-1.5">Current version</th>
                </tr>
              </thead>
              <tbody>
                {q.data.policies.map((p) => (
                  <tr key={p.engineFamily} className="border-b border-line/50">
                    <td className="px-2 py-1.5">
                      <Link to={generatePath(pagePaths.adminWarrantyPolicy, { family: p.engineFamily })} className="font-semibold text-accent underline">
                        {p.familyWords}
                      </Link>
                    </td>
                    {coverageClasses.map((c) => (
                      <td key={c} className="px-2 py-1.5 tabular-nums">
                        {n(p.current.coverage[c].months)} months / {n(p.current.coverage[c].hours)} h
                      </td>
                    ))}
                    <td className="px-2 py-1.5 text-right tabular-nums">{p.current.claimDays} days</td>
                    <td className="px-2 py-1.5 text-right tabular-nums">{p.current.partRetentionDays} days</td>
                    <td className="px-2 py-1.5">{p.current.warrantyEmail}</td>
                    <td className="px-2 py-1.5 text-xs text-muted">
                      version {p.latest.version} of {p.versions}
                      {p.latest.savedBy === "defaults" ? " (as it stood before versions were kept)" : `, saved by ${p.latest.savedBy} ${dateTimeInWords(p.latest.savedAt)}`}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Card>
    </div>
  );
}
