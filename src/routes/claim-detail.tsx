import { useQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import { Card, ErrorNotice, Skeleton } from "@/components/ui/states";
import { claimQueries } from "@/features/claims/api/claim-queries";
import { DeadlineBadge, StatusPill } from "@/features/claims/components/deadline-badge";
import { Cautions, EligibilityPanel, LineFacts, MeasurementPanel } from "@/features/claims/components/line-evidence";
import { CaseLines, ClusterStats } from "@/features/claims/components/cluster-stats";
import { StatusActions } from "@/features/claims/components/status-actions";
import { AttachmentsPanel } from "@/features/claims/components/attachments-panel";
import { NarrativeCard, NotesPanel } from "@/features/claims/components/claim-story";
import { SendPanel } from "@/features/claims/components/send-panel";
import { AuditTrail } from "@/features/claims/components/audit-trail";
import { ClaimLineSplit } from "@/features/claims/components/claim-line-split";
import { ClaimVersions } from "@/features/claims/components/claim-versions";
import type { PrimeCache } from "@/app/page-loader";
import { apiPaths } from "@shared/api-paths";
import { useFormat } from "@/lib/use-format";

// awaited: one claim is a quick lookup, and a claim that is missing or out of scope reaches the claims
// area's error boundary before the page renders
export const primeCache: PrimeCache = (qc, { params }) => qc.ensureQueryData(claimQueries.detail(params.id ?? ""));

export function Component() {
  const f = useFormat();
  const id = useParams().id!;
  // while a send waits for a retry, look again every few seconds
  const q = useQuery({ ...claimQueries.detail(id), refetchInterval: (query) => (query.state.data?.lastSend?.status === "queued" ? 4000 : false) });
  if (q.isPending) return <Skeleton lines={10} label="Loading the claim" />;
  if (q.isError) return <ErrorNotice error={q.error} onRetry={() => q.refetch()} />;
  const c = q.data;
  const line = c.kind === "repair" ? c.lines[0] : undefined;
  return (
    <div className="space-y-4">
      <div>
        <p className="text-sm"><Link to="/claims" className="text-accent hover:underline">Warranty claims</Link> ›</p>
        <div className="flex flex-wrap items-center gap-3">
          <h1 className="text-2xl font-bold">{c.claimNumber}{c.versions.length > 1 && <span className="text-lg font-semibold text-muted"> · version {c.revision}</span>}</h1>
          <StatusPill status={c.status} />
          {c.status === "draft" && <DeadlineBadge deadline={c.deadline} />}
        </div>
        <p className="text-muted">{c.title}</p>
        {c.supersededBy && (
          <p role="status" className="mt-1 rounded border border-ochre/50 bg-ochre/15 px-3 py-1 text-sm">
            This version was rejected and corrected: <Link to={`/claims/${c.supersededBy}`} className="font-semibold text-accent underline">open version {c.revision + 1}</Link>. It is kept here as it was filed.
          </p>
        )}
      </div>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-3">
        <Card title="Filing">
          <div className="space-y-1 text-sm">
            <p>{c.deadline.text}</p>
            <p>{c.shopCode ? `Shop ${c.shopCode}` : "Several shops"} · engine family {c.engineFamily} · {c.claimDays} claim days</p>
            <p className="text-sm text-muted" data-testid="policy-version">{c.policy.text.charAt(0).toUpperCase() + c.policy.text.slice(1)}.</p>
            <p>Parts + labour claimed: <b>{f.money(c.amountClaimed)}</b>{c.split.apart.length > 0 && <> · not claimed <b>{f.money(c.split.amountApart)}</b> ({c.split.apart.length} line{c.split.apart.length === 1 ? "" : "s"} listed apart)</>}{c.amountPaid !== null && <> · paid <b>{f.money(c.amountPaid)}</b></>}{c.amountCredited !== null && <> · credited <b>{f.money(c.amountCredited)}</b></>}</p>
            {c.correction && <p>Version {c.revision} corrects: {c.correction}</p>}
            {c.reason && <p className="text-alert">Maker's reason: {c.reason}</p>}
            {c.note && <p className="text-muted">Note: {c.note}</p>}
          </div>
        </Card>
        <Card title="Status"><StatusActions claim={c} /></Card>
        <Card title="Packet">
          <div className="space-y-3">
            <div className="flex flex-wrap gap-2 text-sm">
              <a href={apiPaths.claimPacket(c.id)} download className="rounded border border-line bg-paper px-3 py-1.5 font-semibold">Download packet (PDF)</a>
              <a href={apiPaths.claimLinesCsv(c.id)} download className="rounded border border-line bg-paper px-3 py-1.5">Claim lines (CSV)</a>
            </div>
            <SendPanel claim={c} />
          </div>
        </Card>
      </div>
      {c.versions.length > 1 && <Card title="Versions"><ClaimVersions claim={c} /></Card>}
      {(c.kind === "campaign" || c.split.apart.length > 0 || c.split.included.some((x) => x.basis === "included")) && (
        <Card title="What the claim asks for"><ClaimLineSplit claim={c} /></Card>
      )}
      {c.cluster && <Card title="Cluster statistics"><ClusterStats snap={c.cluster} /></Card>}
      {line ? (
        <>
          <Card title="Eligibility"><EligibilityPanel line={line} /></Card>
          <Card title="Machine and repair"><LineFacts line={line} /></Card>
          <Card title="Measurements"><MeasurementPanel line={line} /></Card>
        </>
      ) : (
        <Card title={`Repair lines (${c.lines.length}: ${c.eligibilityCounts.covered} covered, ${c.eligibilityCounts.notCovered} not covered, ${c.eligibilityCounts.unknown} cannot tell)`}>
          <CaseLines lines={c.lines} />
        </Card>
      )}
      <Card title="The claim in words"><NarrativeCard claimId={c.id} /></Card>
      <Card title="Attachments"><AttachmentsPanel claim={c} /></Card>
      <Card title="Notes between the clerk and the shop"><NotesPanel claimId={c.id} /></Card>
      <Card title="Audit trail"><AuditTrail audit={c.audit} /></Card>
      <Cautions cautions={c.cautions} />
    </div>
  );
}
