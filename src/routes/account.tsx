import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import type { PrimeCache } from "@/app/page-loader";
import { Card, ErrorNotice, Skeleton } from "@/components/ui/states";
import { meQueries } from "@/features/session/api/me-queries";
import { digestQueries } from "@/features/account/api/digest-queries";
import { DigestSettings } from "@/features/account/components/digest-settings";
import { DigestPreview } from "@/features/account/components/digest-preview";
import { roleLabels } from "@shared/roles";
import { DIGEST_CAUTION } from "@shared/schemas/digest";

// not awaited: the preview reads the benchmarks and the claims, so the page shows the account at once
export const primeCache: PrimeCache = (qc) => void qc.prefetchQuery(digestQueries.current());

export function Component() {
  const { data: me } = useSuspenseQuery(meQueries.current());
  const q = useQuery(digestQueries.current());
  if (!me) return null;
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Your account</h1>
        <p className="text-muted">Who Ironledger knows you as, and the weekly digest it sends you.</p>
      </div>
      <Card title="You">
        <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
          <dt className="font-semibold">Name</dt>
          <dd>{me.name}</dd>
          <dt className="font-semibold">E-mail</dt>
          <dd>{me.email ?? "none known"}</dd>
          <dt className="font-semibold">Roles</dt>
          <dd>{me.roles.map((r) => roleLabels[r]).join(", ") || "none"}</dd>
          <dt className="font-semibold">Shops</dt>
          <dd>{me.scope.kind === "all" ? "All shops" : me.scope.shops.join(", ") || "none"}</dd>
        </dl>
      </Card>
      <Card title="Weekly digest">
        {q.isPending ? <Skeleton lines={2} /> : q.isError ? <ErrorNotice error={q.error} onRetry={() => q.refetch()} /> : <DigestSettings page={q.data} />}
      </Card>
      <Card title={q.data ? `This week's digest (${q.data.preview.weekLabel})` : "This week's digest"}>
        {q.isPending ? (
          <Skeleton lines={6} label="Putting this week's digest together" />
        ) : q.isError ? (
          <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
        ) : (
          <>
            <p className="mb-3 text-sm text-muted">
              As it reads now, with only what your pages show you; the mail carries the same words and links.
            </p>
            <DigestPreview digest={q.data.preview} />
            <p className="mt-4 text-xs text-muted">{DIGEST_CAUTION}</p>
          </>
        )}
      </Card>
    </div>
  );
}
