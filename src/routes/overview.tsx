import { useQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import { overviewQueries, overviewUpdating } from "@/features/overview/api/overview-queries";
import { QueryView } from "@/features/filters/components/query-view";
import { Card, EmptyState } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import type { Overview } from "@shared/schemas/overview";
import { importRoles } from "@shared/roles";
import { meQueries } from "@/features/session/api/me-queries";
import { batchPath } from "@/features/imports/batch-path";
import { useFormat } from "@/lib/use-format";


/** The files of a shop's last load that had rejects, each linking to its rejects (for the roles that may open them). */
function RejectLinks({ files }: { files: Overview["loads"][number]["files"] }) {
  const me = useQuery(meQueries.current());
  const canOpen = me.data?.roles.some((r) => (importRoles as readonly string[]).includes(r)) ?? false;
  const withRejects = files.filter((f) => f.rowsRejected > 0);
  if (!canOpen || withRejects.length === 0) return null;
  return (
    <span className="block text-xs font-normal">
      {withRejects.map((f) => (
        <Link key={f.batchId} to={batchPath(f.batchId)} className="mr-2 underline" title={`The ${f.rowsRejected} rejected rows of ${f.fileName}`}>
          see rejects{withRejects.length > 1 ? ` of ${f.fileName}` : ""}
        </Link>
      ))}
    </span>
  );
}

function Loads({ loads }: { loads: Overview["loads"] }) {
  const fmt = useFormat();
  const n = fmt.count;
  const when = (iso: string | null) => (iso ? fmt.dateTime(iso) : "never");
  if (!loads.length) {
    return (
      <EmptyState title="Nothing loaded yet">
        No export has been loaded for your shops. Loads appear here once a shop's export is fed in, on the Imports page (shop managers, analysts, admins) or by the ETL command.
      </EmptyState>
    );
  }
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm">
        <thead className="text-muted">
          <tr className="border-b border-line"><th className="py-1.5 pr-3">Shop</th><th className="pr-3">Last load</th><th className="pr-3">Files</th><th className="pr-3 text-right">Rows read</th><th className="text-right">Rejected</th></tr>
        </thead>
        <tbody>
          {loads.map((l) => (
            <tr key={l.shopCode ?? "group"} className="border-b border-line/60 align-top">
              <td className="py-1.5 pr-3 font-semibold">{l.shopCode ? `${l.shopCode} · ${l.shopName}` : l.shopName}</td>
              <td className="pr-3">{when(l.lastFinishedAt)}</td>
              <td className="pr-3 text-muted">{l.files.map((f) => `${f.fileName} (${f.kind})`).join(", ")}</td>
              <td className="pr-3 text-right tabular-nums">{n(l.rowsRead)}</td>
              <td className={`text-right tabular-nums ${l.rowsRejected ? "font-semibold text-alert" : ""}`} title={l.files.map((f) => `${f.fileName}: ${f.rowsRejected} rejected`).join("\n")}>
                {n(l.rowsRejected)}
                {l.rowsRead > 0 && <span className="ml-1 text-xs font-normal text-muted">({fmt.percent(l.rowsRejected / l.rowsRead)})</span>}
                <RejectLinks files={l.files} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function Headlines({ h }: { h: Overview["headlines"] }) {
  const fmt = useFormat();
  const n = fmt.count;
  const rate = (r: { rate: number; lower: number; upper: number } | null) => (r ? `${fmt.quantity("rate", r.rate)} (${fmt.quantity("rate", r.lower)}–${fmt.quantity("rate", r.upper)})` : "—");
  if (!h.thisYear || !h.rows.length) return <EmptyState title="No exposure yet">{h.note ?? "Rates need machine hours in the warehouse; none are loaded for your shops."}</EmptyState>;
  return (
    <>
      {h.note && <p className="mb-3 text-sm" data-testid="headline-windows">{h.note}</p>}
      <div className="grid gap-3 sm:grid-cols-3">
        {h.rows.map((r) => {
          const up = r.change !== null && r.change > 1;
          return (
            <div key={r.label} className="rounded border border-line p-3">
              <p className="text-sm font-semibold">{r.label}</p>
              <p className="mt-1 text-2xl font-bold tabular-nums">{r.thisYear.rate ? fmt.quantity("rate", r.thisYear.rate.rate) : "—"}</p>
              <p className="text-xs text-muted">per {fmt.count(1000)} engine hours, {fmt.date(h.thisYear!.from)} to {fmt.date(h.thisYear!.to)}; 95 % {rate(r.thisYear.rate)}</p>
              <p className="mt-2 text-sm">
                Last year {r.lastYear.rate ? fmt.quantity("rate", r.lastYear.rate.rate) : "—"}
                {r.change !== null && <span className={`ml-2 font-semibold ${up ? "text-alert" : "text-ok"}`}>{up ? "▲" : "▼"} {fmt.percent(Math.abs(r.change - 1))}</span>}
              </p>
              <p className="text-xs text-muted">{n(r.thisYear.failures)} failures this year, {n(r.lastYear.failures)} the year before</p>
            </div>
          );
        })}
      </div>
      <p className="mt-2 text-xs text-muted">{h.method}</p>
    </>
  );
}

function NewClusters({ c }: { c: Overview["clusters"] }) {
  const fmt = useFormat();
  const when = (iso: string | null) => (iso ? fmt.dateTime(iso) : "never");
  const intro = c.firstVisit
    ? `Your first visit: all ${fmt.count(c.total)} clusters the finder reports are new to you.`
    : c.newCount
      ? `${fmt.count(c.newCount)} of ${fmt.count(c.total)} clusters were not there at your last visit (${when(c.previousVisitAt)}).`
      : `Nothing new since your last visit (${when(c.previousVisitAt)}); ${fmt.count(c.total)} clusters in all.`;
  return (
    <>
      <p className="text-sm text-muted">{intro}</p>
      {c.newSinceLastVisit.length > 0 && (
        <ol className="mt-2 space-y-1.5">
          {c.newSinceLastVisit.slice(0, 6).map((x) => (
            <li key={x.id} className="text-sm">
              <Link to={`/clusters/${x.id}`} className="text-accent underline-offset-2 hover:underline">{x.description}</Link>
            </li>
          ))}
        </ol>
      )}
      <Link to="/clusters" className="mt-3 inline-block text-sm font-semibold text-accent">All clusters →</Link>
    </>
  );
}

function FindingList({ items, empty }: { items: NonNullable<Overview["findings"]>["sinceVisit"]; empty: string }) {
  if (!items.length) return <p className="text-sm text-muted">{empty}</p>;
  return (
    <ol className="mt-1 space-y-1.5">
      {items.map((x) => (
        <li key={x.key} className="text-sm">
          <span className="mr-1 rounded-full border border-slate px-1.5 text-xs font-semibold">{x.change}</span>
          {x.id ? (
            <Link to={`/clusters/${x.id}`} className="text-accent underline-offset-2 hover:underline">{x.sentence}</Link>
          ) : (
            <span>{x.sentence}</span>
          )}
        </li>
      ))}
    </ol>
  );
}

function FindingChanges({ f }: { f: NonNullable<Overview["findings"]> }) {
  const fmt = useFormat();
  const when = (iso: string | null) => (iso ? fmt.dateTime(iso) : "never");
  return (
    <div className="space-y-3">
      <div>
        <h3 className="text-sm font-semibold">Since your last visit{f.previousVisitAt ? ` (${when(f.previousVisitAt)})` : ""}</h3>
        <FindingList items={f.sinceVisit} empty="No finding is new or changed since your last visit." />
      </div>
      <div>
        <h3 className="text-sm font-semibold">Since the last load{f.lastLoadAt ? ` (${when(f.lastLoadAt)})` : ""}</h3>
        <FindingList items={f.sinceLoad} empty="The last load changed no finding." />
      </div>
      <Link to="/clusters" className="inline-block text-sm font-semibold text-accent">All findings →</Link>
    </div>
  );
}

function Attention({ a }: { a: Overview["attention"] }) {
  const fmt = useFormat();
  if (!a.machines.length) return <EmptyState title="No machine stands out">No failure visits in the last 365 days of data for your shops.</EmptyState>;
  return (
    <>
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm">
          <thead className="text-muted">
            <tr className="border-b border-line"><th className="py-1.5 pr-3">Machine</th><th className="pr-3">Home shop</th><th className="pr-3 text-right">Visits</th><th className="pr-3 text-right">Comebacks</th><th className="pr-3">Repeat repairs</th><th className="pr-3 text-right">Score</th><th>Latest</th></tr>
          </thead>
          <tbody>
            {a.machines.map((m) => (
              <tr key={m.serial} className="border-b border-line/60">
                <td className="py-1.5 pr-3"><span className="font-semibold">{m.serial}</span> <span className="text-muted">{m.modelLine} · {m.engineFamily}</span></td>
                <td className="pr-3">{m.homeShop ?? "—"}</td>
                <td className="pr-3 text-right tabular-nums">{fmt.count(m.failures)}</td>
                <td className="pr-3 text-right tabular-nums">{fmt.count(m.comebacks)}</td>
                <td className="pr-3">{m.repeatComponents.join(", ") || "—"}</td>
                <td className="pr-3 text-right font-semibold tabular-nums">{fmt.quantity("plain", m.score)}</td>
                <td><Link to={`/repairs/${m.lastRepairId}`} className="text-accent hover:underline">{fmt.date(m.lastOpened)}</Link></td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="mt-2 text-xs text-muted">How this list is made: {a.definition}{a.windowEnd ? ` Latest repair order: ${a.windowEnd}.` : ""}</p>
    </>
  );
}

// prefetched, not awaited: the overview includes the cluster scan, which can take seconds on a fresh server
export const primeCache: PrimeCache = (qc) => {
  void qc.prefetchQuery(overviewQueries.current());
};

/** Which data the page shows: said only while the server is still computing the answer for a newer load. */
function AsOf({ o }: { o: Overview }) {
  const fmt = useFormat();
  const when = (iso: string | null) => (iso ? fmt.dateTime(iso) : "never");
  if (!overviewUpdating(o)) return null;
  const at = [o.asOf, o.clusters.asOf].filter((a) => a && !a.current).map((a) => a!.computedAt).sort()[0];
  return (
    <p role="status" className="text-sm text-muted">
      Computed for the data as of {when(at ?? null)}; new data has been loaded since and the page is updating…
    </p>
  );
}

export function Component() {
  const q = useQuery(overviewQueries.current());
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Overview</h1>
      <QueryView query={q} label="the overview" lines={8}>
        {(o) => (
          <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-2">
            <div className="lg:col-span-2 empty:hidden"><AsOf o={o} /></div>
            <Card title="Failure rates against last year"><Headlines h={o.headlines} /></Card>
            {o.findings ? (
              <Card title="Findings new or changed"><FindingChanges f={o.findings} /></Card>
            ) : (
              <Card title="New clusters since your last visit"><NewClusters c={o.clusters} /></Card>
            )}
            <div className="lg:col-span-2"><Card title="Last loads per shop"><Loads loads={o.loads} /></Card></div>
            <div className="lg:col-span-2"><Card title="Machines most in need of attention"><Attention a={o.attention} /></Card></div>
          </div>
        )}
      </QueryView>
    </div>
  );
}
