import { VersionHistory } from "@/components/version-history";
import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Link, generatePath, useNavigate, useParams, useSearchParams } from "react-router-dom";
import { Card } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { pagePaths } from "@/app/page-paths";
import { QueryView } from "@/features/filters/components/query-view";
import { policyQueries } from "@/features/admin/warranty-policies/api/policy-queries";
import { PolicyForm } from "@/features/admin/warranty-policies/components/policy-form";
import { coverageClasses, type PolicyTerms } from "@shared/schemas/warranty-policies";

const versionOf = (s: URLSearchParams) => {
  const v = Number(s.get("version"));
  return Number.isInteger(v) && v > 0 ? v : undefined;
};

// awaited: one policy, and a family without one reaches the area's error boundary before the page draws
export const primeCache: PrimeCache = (qc, { params, url }) => qc.ensureQueryData(policyQueries.detail(params.family ?? "", versionOf(url.searchParams)));

const terms = (p: PolicyTerms) =>
  `${coverageClasses.map((c) => `${c} ${p.coverage[c].months} mo / ${p.coverage[c].hours.toLocaleString("en-US")} h`).join(", ")}; file within ${p.claimDays} days; keep parts ${p.partRetentionDays} days; to ${p.warrantyEmail}`;

export function Component() {
  const family = useParams().family!;
  const [params] = useSearchParams();
  const version = versionOf(params);
  const q = useQuery(policyQueries.detail(family, version));
  const navigate = useNavigate();
  const latestPath = generatePath(pagePaths.adminWarrantyPolicy, { family });
  const [saved, setSaved] = useState<string | null>(null);

  return (
    <div className="space-y-4">
      <div>
        <Link to={pagePaths.adminWarrantyPolicies} className="text-sm text-accent underline">All warranty policies</Link>
        <h1 className="text-2xl font-bold">Warranty policy: {q.data?.familyWords ?? family}</h1>
      </div>
      {saved && version === undefined && (
        <p role="status" className="rounded border border-line bg-card px-3 py-2 text-sm">
          {saved}
        </p>
      )}
      <QueryView query={q} label="the warranty policy">
        {(d) => {
          const old = d.version !== d.latestVersion;
          return (
            <>
              <p className="text-muted">
                Version {d.version}
                {old ? (
                  <> of {d.latestVersion}: an older version, shown as it was (read only). <Link to={latestPath} className="text-accent underline">Open the current version</Link></>
                ) : (
                  ": the current version. Claims made from now on are judged under it."
                )}
              </p>
              <Card>
                <PolicyForm
                  key={`${d.engineFamily}-${d.version}-${d.latestVersion}`}
                  detail={d}
                  readOnly={old}
                  onSaved={(v) => {
                    setSaved(`Saved as version ${v}. Claims made from now on are judged under it; claims made before keep their version.`);
                    if (version !== undefined) navigate(latestPath);
                  }}
                />
              </Card>
              <Card title="Versions">
                <VersionHistory label="Versions of the policy" history={d.history} current={d.version} hrefOf={(v) => `${latestPath}?version=${v}`} extra={[{ header: "Terms", cell: (h) => terms(h.policy) }, { header: "Claims judged under it", cell: (h) => h.claims.toLocaleString("en"), numeric: true }]} />
              </Card>
            </>
          );
        }}
      </QueryView>
    </div>
  );
}
