import { currentTemperatureUnit, useTemperatureUnit } from "@/features/filters/hooks/use-temperature-unit";
import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { Link, useNavigate, useSearchParams } from "react-router-dom";
import { useState } from "react";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { claimQueries, useCreateClaim } from "@/features/claims/api/claim-queries";
import { DeadlineBadge } from "@/features/claims/components/deadline-badge";
import { Cautions, EligibilityPanel, LineFacts, MeasurementPanel } from "@/features/claims/components/line-evidence";
import { CaseLines, ClusterStats } from "@/features/claims/components/cluster-stats";
import type { ClaimPreview } from "@shared/schemas/claims";
import type { Me } from "@shared/schemas/me";
import type { PrimeCache } from "@/app/page-loader";
import { meQueries } from "@/features/session/api/me-queries";
import { ClaimQueueTable } from "@/features/claims/components/claim-queue-table";
import { useFormat } from "@/lib/use-format";

/** Campaign cases span shops, so only a group-wide role (the clerk) makes them. */
const makesCampaignCases = (me: Me | null) => me?.scope.kind === "all";

function Chooser() {
  const { data: me } = useSuspenseQuery(meQueries.current());
  const groupWide = makesCampaignCases(me);
  const clusters = useQuery({ ...claimQueries.clusterChoices(), enabled: groupWide });
  const [, setParams] = useSearchParams();
  return (
    <div className="min-w-0 space-y-4">
      <div className="min-w-0 lg:col-span-2">
        <Card title="Repair lines in warranty, not yet claimed">
          <ClaimQueueTable onPick={(id) => setParams({ repairLine: id })} />
        </Card>
      </div>
      <Card title="A campaign case from a cluster">
        {!groupWide ? (
          <p className="text-sm text-muted">Campaign cases span shops, so the warranty clerk makes them. Open a claim from one of your shop's repair lines instead.</p>
        ) : clusters.isPending ? (
          <Skeleton lines={5} label="Loading clusters" />
        ) : clusters.isError ? (
          <ErrorNotice error={clusters.error} onRetry={() => clusters.refetch()} />
        ) : clusters.data.clusters.length === 0 ? (
          <EmptyState title="No cluster stands out in the data right now" />
        ) : (
          <ul className="space-y-2" aria-label="Clusters to choose from">
            {clusters.data.clusters.map((c) => (
              <li key={c.id} className="flex items-start justify-between gap-3 rounded border border-line p-2 text-sm">
                <div>
                  <p className="font-medium">{c.description}</p>
                  <p className="text-xs text-muted">{c.observed} failures, {c.expected.toFixed(1)} expected, ratio {c.ratio.toFixed(1)} · {c.repairLineIds.length} repair lines</p>
                </div>
                <button type="button" onClick={() => setParams({ cluster: c.id })} className="shrink-0 rounded bg-slate px-3 py-1 text-paper" aria-label={`Use cluster: ${c.description}`}>
                  Use
                </button>
              </li>
            ))}
          </ul>
        )}
      </Card>
    </div>
  );
}

function PreviewView({ p, onCreate, creating }: { p: ClaimPreview; onCreate: () => void; creating: boolean }) {
  const f = useFormat();
  const c = p.eligibilityCounts;
  const blocked = p.problems.length > 0 && (p.kind === "repair" || p.lines.length === 0);
  return (
    <div className="space-y-4">
      <Card title={p.title}>
        <div className="flex flex-wrap items-center gap-4 text-sm">
          {p.deadline && <span>{p.deadline.text} <DeadlineBadge deadline={p.deadline} /></span>}
          <span>Parts + labour: <b>{f.money(p.amountClaimed)}</b></span>
          {p.kind === "campaign" && <span>{p.lines.length} repair lines: {c.covered} covered, {c.notCovered} not covered, {c.unknown} cannot tell</span>}
        </div>
        {p.existingClaims.length > 0 && (
          <p className="mt-2 text-sm">
            Already in: {p.existingClaims.map((x, i) => <span key={x.id}>{i > 0 && ", "}<Link className="text-accent underline" to={`/claims/${x.id}`}>{x.claimNumber}</Link> ({x.status})</span>)}
          </p>
        )}
        {p.problems.map((m) => <p key={m} role="alert" className="mt-2 text-sm text-alert">{m}</p>)}
        <button type="button" disabled={blocked || creating} onClick={onCreate} className="mt-3 rounded bg-accent px-4 py-2 font-semibold text-white disabled:opacity-50">
          {creating ? "Making…" : p.kind === "campaign" ? "Make the campaign case" : "Make the claim"}
        </button>
      </Card>
      {p.cluster && (
        <Card title="Cluster statistics"><ClusterStats snap={p.cluster} /></Card>
      )}
      {p.kind === "campaign" ? (
        <Card title="Repair lines"><CaseLines lines={p.lines} /></Card>
      ) : (
        p.lines[0] && (
          <>
            <Card title="Eligibility"><EligibilityPanel line={p.lines[0]} /></Card>
            <Card title="Machine and repair"><LineFacts line={p.lines[0]} /></Card>
            <Card title="Measurements"><MeasurementPanel line={p.lines[0]} /></Card>
            <Cautions cautions={p.cautions} />
          </>
        )
      )}
    </div>
  );
}

/** The page's query with the user's temperature unit (the preview's cautions and cluster words, and the claim's packet, use it). */
function withUnit(params: URLSearchParams, unit: "C" | "F"): string {
  const p = new URLSearchParams(params);
  if (!p.has("unit")) p.set("unit", unit);
  return p.toString();
}

// prefetched, not awaited: a campaign preview and the cluster choices both run the cluster scan, and the
// queue of unclaimed lines judges eligibility line by line; the page shows each part as it arrives
export const primeCache: PrimeCache = (qc, { url, me }) => {
  const params = url.searchParams;
  if (params.get("cluster") || params.get("repairLine")) {
    void qc.prefetchQuery(claimQueries.preview(withUnit(params, currentTemperatureUnit())));
    return;
  }
  void qc.prefetchQuery(claimQueries.candidates());
  if (makesCampaignCases(me)) void qc.prefetchQuery(claimQueries.clusterChoices());
};

export function Component() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const create = useCreateClaim();
  const cluster = params.get("cluster");
  const repairLine = params.get("repairLine");
  const [unit] = useTemperatureUnit();
  const search = withUnit(params, unit);
  const preview = useQuery({ ...claimQueries.preview(search), enabled: Boolean(cluster || repairLine) });
  const onCreate = () => {
    const clusterQuery = Object.fromEntries([...new URLSearchParams(search)].filter(([k]) => k !== "cluster" && k !== "repairLine"));
    create.mutate(cluster ? { kind: "campaign", clusterId: cluster, clusterQuery, unit } : { kind: "repair", repairLineId: repairLine!, unit }, { onSuccess: (c) => navigate(`/claims/${c.id}`) });
  };
  return (
    <div className="space-y-4">
      <div>
        <p className="text-sm"><Link to="/claims" className="text-accent hover:underline">Warranty claims</Link> ›</p>
        <h1 className="text-2xl font-bold">{cluster ? "New campaign case" : repairLine ? "New claim" : "New claim or campaign case"}</h1>
        <p className="text-muted">Eligibility and the filing deadline are worked out from the machine registry and the repair order; nothing here is typed in.</p>
      </div>
      {!cluster && !repairLine ? (
        <Chooser />
      ) : preview.isPending ? (
        <Skeleton lines={8} label="Loading the evidence" />
      ) : preview.isError ? (
        <div className="space-y-2">
          <ErrorNotice error={preview.error} onRetry={() => preview.refetch()} />
          <Link to="/claims/new" className="text-sm text-accent underline">Choose again</Link>
        </div>
      ) : (
        <>
          {create.isError && <ErrorNotice error={create.error} />}
          <PreviewView p={preview.data} onCreate={onCreate} creating={create.isPending} />
        </>
      )}
    </div>
  );
}
