import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import { clusterQueries } from "@/features/clusters/api/cluster-queries";
import { clusterProfileChart, clusterTimelineChart } from "@/features/clusters/charts/cluster-charts";
import { readFilters, useFilters } from "@/features/filters/use-filters";
import { currentTemperatureUnit, useTemperatureUnit } from "@/features/filters/hooks/use-temperature-unit";
import { QueryView } from "@/features/filters/components/query-view";
import { ChartCard } from "@/components/chart-card";
import { Card } from "@/components/ui/states";
import { palette } from "@/lib/palette";
import { pagePaths } from "@/app/page-paths";
import type { PrimeCache } from "@/app/page-loader";
import { hourBandLabel, temperatureBandLabel } from "@shared/bands";
import type { ClusterDetail } from "@shared/schemas/analytics-clusters";
import { claimRoles, findingReadRoles } from "@shared/roles";
import { findingKey } from "@shared/finding-key";
import { FindingWorkPanel } from "@/features/clusters/components/finding-work";
import { meQueries } from "@/features/session/api/me-queries";
import { useFormat } from "@/lib/use-format";

function Summary({ d }: { d: ClusterDetail }) {
  const fmt = useFormat();
  const c = d.cluster;
  const dims = c.dimensions;
  const items: [string, string][] = [
    ["Observed", fmt.count(c.observed)],
    ["Expected", fmt.quantity("plain", c.expected)],
    ["Ratio (95 %)", `${fmt.quantity("ratio", c.ratio)} (${fmt.quantity("ratio", c.lower)}–${fmt.quantity("ratio", c.upper)})`],
    ["q value", fmt.pValue(c.qValue)],
    ["Engine family", dims.engineFamily === "all" ? "any" : dims.engineFamily],
    ["Built", dims.build === "all" ? "any time" : `${dims.build.from} to ${dims.build.to}`],
    ["Lot", dims.supplierLot === "all" ? "any" : dims.supplierLot],
    ["Shop", dims.shop === "all" ? "any" : dims.shop],
  ];
  return (
    <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
      {items.map(([k, v]) => (
        <div key={k} className="rounded border border-line p-2">
          <dt className="text-xs uppercase tracking-wide text-muted">{k}</dt>
          <dd className="font-semibold tabular-nums">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

// prefetched, not awaited: the detail is read from the cluster scan, which can take seconds on a fresh server
export const primeCache: PrimeCache = (qc, { params, url }) => {
  void qc.prefetchQuery(clusterQueries.detail(params.id ?? "", readFilters(url.searchParams).search, currentTemperatureUnit()));
};

export function Component() {
  const fmt = useFormat();
  const { id = "" } = useParams();
  const { search } = useFilters();
  const [unit] = useTemperatureUnit();
  const q = useQuery(clusterQueries.detail(id, search, unit));
  const { data: me } = useSuspenseQuery(meQueries.current());
  const canClaim = (me?.roles ?? []).some((r) => (claimRoles as readonly string[]).includes(r));
  const readsFindings = (me?.roles ?? []).some((r) => (findingReadRoles as readonly string[]).includes(r));
  return (
    <div className="space-y-4">
      <Link to={`/clusters${search ? `?${search}` : ""}`} className="text-sm text-accent">← All clusters</Link>
      <QueryView query={q} label="the cluster" lines={10}>
        {(d) => (
          <>
            <div className="flex flex-wrap items-start justify-between gap-3">
              <h1 className="max-w-3xl text-xl font-bold">{d.cluster.description}</h1>
              {canClaim ? (
                <Link to={`${pagePaths.claimNew}?cluster=${encodeURIComponent(d.cluster.id)}`} className="rounded bg-accent px-3 py-2 text-sm font-semibold text-white">Open a warranty case</Link>
              ) : (
                // not offered to a role that cannot open one: said, so the analyst knows whom to send the page to
                <p className="max-w-64 text-right text-xs text-muted">A warranty clerk or a shop manager opens warranty cases from this page; send them its link.</p>
              )}
            </div>
            <Summary d={d} />
            {readsFindings && <FindingWorkPanel findingKey={findingKey(d.cluster.dimensions)} />}
            <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-2">
              <div className="lg:col-span-2">
                <ChartCard title="Failures by month" subtitle="When the cluster's repair orders opened" options={clusterTimelineChart(d, palette, fmt)} rows={d.timeline} columns={[{ key: "month", label: "Month" }, { key: "failures", label: "Failures" }]} filename={`cluster-${d.cluster.id}-months.csv`} />
              </div>
              <ChartCard
                title="Temperature profile"
                subtitle="Share of the cluster's failures in each daily-minimum band, beside all other failures of the same components"
                options={clusterProfileChart(d.temperatureProfile, (b) => (b === "unknown" ? "no weather" : temperatureBandLabel(b, unit)), `Daily minimum at the home shop (°${unit})`, palette, fmt)}
                rows={d.temperatureProfile.map((b) => ({ ...b, label: temperatureBandLabel(b.band, unit) }))}
                columns={[{ key: "label", label: "Band" }, { key: "inCluster", label: "In cluster" }, { key: "elsewhere", label: "Other failures" }]}
                filename={`cluster-${d.cluster.id}-temperature.csv`}
              />
              <ChartCard
                title="Hour-meter profile"
                subtitle="Share of failures in each engine-hour band"
                options={clusterProfileChart(d.hourProfile, (b) => (b === "unknown" ? "no reading" : hourBandLabel(b)), "Engine hours at the repair", palette, fmt)}
                rows={d.hourProfile.map((b) => ({ ...b, label: hourBandLabel(b.band) }))}
                columns={[{ key: "label", label: "Band" }, { key: "inCluster", label: "In cluster" }, { key: "elsewhere", label: "Other failures" }]}
                filename={`cluster-${d.cluster.id}-hours.csv`}
              />
            </div>
            <Card title={`Repair lines (${fmt.count(d.lines.length)})`}>
              <div className="max-h-[28rem] overflow-auto">
                <table className="w-full text-left text-sm">
                  <thead className="sticky top-0 bg-card text-muted">
                    <tr className="border-b border-line"><th className="py-1.5 pr-3">Opened</th><th className="pr-3">Shop</th><th className="pr-3">Repair order</th><th className="pr-3">Serial</th><th className="pr-3 text-right">Hours</th><th>Complaint</th></tr>
                  </thead>
                  <tbody>
                    {d.lines.map((l) => (
                      <tr key={l.id} className="border-b border-line/60">
                        <td className="py-1.5 pr-3 tabular-nums">{fmt.date(l.openedDate)}</td>
                        <td className="pr-3">{l.shopCode}</td>
                        <td className="pr-3"><Link to={`/repairs/${l.id}`} className="text-accent hover:underline">{l.roNumber}/{l.lineNo}</Link></td>
                        <td className="pr-3">{l.serial}</td>
                        <td className="pr-3 text-right tabular-nums">{l.hourMeter === null ? "—" : fmt.quantity("hours", l.hourMeter)}</td>
                        <td className="text-muted">{l.complaint ?? "—"}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </Card>
            <Card title={`Machines (${fmt.count(d.machines.length)})`}>
              <div className="max-h-80 overflow-auto">
                <table className="w-full text-left text-sm">
                  <thead className="sticky top-0 bg-card text-muted">
                    <tr className="border-b border-line"><th className="py-1.5 pr-3">Serial</th><th className="pr-3">Model</th><th className="pr-3">Home shop</th><th className="pr-3">Built</th><th className="pr-3">Lot</th><th className="pr-3 text-right">Failures</th><th>First – last</th></tr>
                  </thead>
                  <tbody>
                    {d.machines.map((m) => (
                      <tr key={m.serial} className="border-b border-line/60">
                        <td className="py-1.5 pr-3 font-semibold">{m.serial}</td>
                        <td className="pr-3">{m.modelLine} · {m.engineFamily}</td>
                        <td className="pr-3">{m.homeShop}</td>
                        <td className="pr-3 tabular-nums">{m.buildDate ? fmt.date(m.buildDate) : "—"}</td>
                        <td className="pr-3">{m.lot}</td>
                        <td className="pr-3 text-right tabular-nums">{fmt.count(m.failures)}</td>
                        <td className="tabular-nums">{fmt.date(m.firstFailure)}{m.lastFailure !== m.firstFailure ? ` – ${fmt.date(m.lastFailure)}` : ""}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </Card>
            <p className="text-xs text-muted"><b>How:</b> {d.method} <b>Caution:</b> {d.caution}</p>
          </>
        )}
      </QueryView>
    </div>
  );
}
