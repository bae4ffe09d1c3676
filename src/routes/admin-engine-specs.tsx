import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Link, useSearchParams } from "react-router-dom";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { pagePaths } from "@/app/page-paths";
import { QueryView } from "@/features/filters/components/query-view";
import { engineSpecAdminQueries } from "@/features/admin/engine-specs/api/engine-spec-queries";
import { EngineSpecForm } from "@/features/admin/engine-specs/components/engine-spec-form";
import { dateTimeInWords } from "@/features/imports/import-words";
import { useFormat } from "@/lib/use-format";
import type { EngineSpec } from "@shared/schemas/engine-specs";

// awaited: a short list, and someone who is not an administrator reaches the area's error boundary
export const primeCache: PrimeCache = (qc) => qc.ensureQueryData(engineSpecAdminQueries.list());

function Figures({ s }: { s: EngineSpec }) {
  const fmt = useFormat();
  const p = (psi: number) => fmt.pressure(psi, "psi", s.enteredUnit);
  return (
    <>
      target {p(s.targetMinPsi)}–{p(s.targetMaxPsi)}, minimum {p(s.allowableMinPsi)}
      {s.enteredUnit === "psi" ? "" : ` (${fmt.pressure(s.allowableMinPsi, "psi", "psi")})`}
      {s.plugHealthyMaxOhms !== null ? `; plugs healthy up to ${s.plugHealthyMaxOhms} Ω` : ""}
    </>
  );
}

export function Component() {
  const [params] = useSearchParams();
  const family = params.get("family") ?? "";
  const list = useQuery(engineSpecAdminQueries.list());
  const detail = useQuery(engineSpecAdminQueries.detail(family));
  const [saved, setSaved] = useState<string | null>(null);

  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Engine figures</h1>
        <p className="text-muted">
          Each engine family's own compression figures (and, where given, the heater plug's healthy maximum) from the maker's service manual. Where a family has
          figures, the bench sheet, the repair record and the claim packet judge its readings against them and name them as the source; without, the general
          bands apply. Every save is kept as a new version. The maker's service manual always wins over a figure typed here: check it when in doubt.
        </p>
      </div>
      <Card>
        {list.isPending ? (
          <Skeleton />
        ) : list.isError ? (
          <ErrorNotice error={list.error} onRetry={() => list.refetch()} />
        ) : list.data.families.length === 0 ? (
          <EmptyState title="No engine families yet" />
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" aria-label="Engine families and their figures">
              <thead className="text-muted">
                <tr>
                  <th scope="col" className="border-b border-line px-2 py-1.5">Engine family</th>
                  <th scope="col" className="border-b border-line px-2 py-1.5">Figures</th>
                  <th scope="col" className="border-b border-line px-2 py-1.5">Source</th>
                  <th scope="col" className="border-b border-line px-2 py-1.5 text-right">Versions</th>
                </tr>
              </thead>
              <tbody>
                {list.data.families.map((f) => (
                  <tr key={f.engineFamily} className="border-b border-line/50" aria-current={f.engineFamily === family ? "true" : undefined}>
                    <td className="px-2 py-1.5">
                      <Link to={`${pagePaths.adminEngineSpecs}?family=${encodeURIComponent(f.engineFamily)}`} className="font-semibold text-accent underline">
                        {f.engineFamily}
                      </Link>
                      {f.description && <span className="block text-xs text-muted">{f.description}</span>}
                    </td>
                    <td className="px-2 py-1.5">{f.current ? <Figures s={f.current} /> : <span className="text-muted">none: general bands</span>}</td>
                    <td className="px-2 py-1.5">{f.current?.source ?? "—"}</td>
                    <td className="px-2 py-1.5 text-right tabular-nums">{f.versions}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Card>
      {saved && (
        <p role="status" className="rounded border border-line bg-card px-3 py-2 text-sm">
          {saved}
        </p>
      )}
      {family && (
        <QueryView query={detail} label="the engine family's figures">
          {(d) => (
            <>
              <Card title={`${d.engineFamily}: ${d.current ? `version ${d.current.version}` : "no figures yet"}`}>
                <EngineSpecForm
                  key={`${d.engineFamily}-${d.current?.version ?? 0}`}
                  detail={d}
                  onSaved={(v) => setSaved(`Saved ${d.engineFamily} as version ${v}. Readings of this family are judged against it from now on.`)}
                />
              </Card>
              <Card title="Versions">
                {d.history.length === 0 ? (
                  <p className="text-sm text-muted">No version saved yet.</p>
                ) : (
                  <div className="overflow-x-auto">
                    <table className="w-full text-left text-sm" aria-label={`Versions of ${d.engineFamily}'s figures`}>
                      <thead className="text-muted">
                        <tr>
                          <th scope="col" className="border-b border-line px-2 py-1.5">Version</th>
                          <th scope="col" className="border-b border-line px-2 py-1.5">Saved</th>
                          <th scope="col" className="border-b border-line px-2 py-1.5">Figures</th>
                          <th scope="col" className="border-b border-line px-2 py-1.5">Source</th>
                          <th scope="col" className="border-b border-line px-2 py-1.5">Why</th>
                        </tr>
                      </thead>
                      <tbody>
                        {d.history.map((h) => (
                          <tr key={h.version} className="border-b border-line/50">
                            <td className="px-2 py-1.5 tabular-nums">{h.version}</td>
                            <td className="px-2 py-1.5">{h.savedBy}, {dateTimeInWords(h.savedAt)}</td>
                            <td className="px-2 py-1.5"><Figures s={h} /></td>
                            <td className="px-2 py-1.5">{h.source}</td>
                            <td className="px-2 py-1.5">{h.note}</td>
                          </tr>
                        ))}
                      </tbody>
                    </table>
                  </div>
                )}
              </Card>
            </>
          )}
        </QueryView>
      )}
      {!family && <p className="text-sm text-muted">Pick an engine family above to enter or change its figures.</p>}
    </div>
  );
}
