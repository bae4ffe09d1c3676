import { Link } from "react-router-dom";
import type { Cluster, Finding } from "@shared/schemas/analytics-clusters";
import { RatioStrip } from "./ratio-strip";
import { FindingStatusPill } from "./finding-work";
import type { FindingState } from "@shared/schemas/findings";
import { useFormat } from "@/lib/use-format";

/** Observed, expected, the ratio on its strip with the interval, and q: the figures of one cluster on one line. */
export function ClusterFigures({ c }: { c: Cluster }) {
  const fmt = useFormat();
  const ratio = (v: number) => fmt.quantity("ratio", v);
  return (
    <div className="grid items-center gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_auto_1fr_auto]">
      <span><span className="text-muted">Observed</span> <b className="tabular-nums">{fmt.count(c.observed)}</b></span>
      <span><span className="text-muted">Expected</span> <b className="tabular-nums">{fmt.quantity("plain", c.expected)}</b></span>
      <RatioStrip ratio={c.ratio} lower={c.lower} upper={c.upper} />
      <span className="tabular-nums">×{ratio(c.ratio)} <span className="text-muted">({ratio(c.lower)}–{ratio(c.upper)}), q {fmt.pValue(c.qValue)}</span></span>
    </div>
  );
}

/** One finding: its sentence (linking to the lead cluster's evidence), its figures, and the cells inside it. */
export function FindingCard({ f, search, state }: { f: Finding; search: string; state?: FindingState }) {
  const fmt = useFormat();
  const to = (id: string) => `/clusters/${id}${search ? `?${search}` : ""}`;
  return (
    <article aria-labelledby={`finding-${f.id}`} className="rounded-lg border border-line bg-card p-3 shadow-sm">
      <div className="flex flex-wrap items-start gap-3">
        <span className="grid h-8 w-8 shrink-0 place-items-center rounded-full bg-slate text-sm font-bold text-paper" aria-label={`Finding ${f.rank}`}>
          {f.rank}
        </span>
        <div className="min-w-0 flex-1 space-y-2">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <p className="text-xs font-semibold uppercase tracking-wide text-muted">{f.partName}</p>
            {state && <FindingStatusPill state={state} />}
          </div>
          <Link id={`finding-${f.id}`} to={to(f.id)} className="block font-semibold text-ink hover:text-accent hover:underline">
            {f.sentence}
          </Link>
          {f.life && <p className="text-sm" data-testid="finding-life">{f.life}</p>}
          <ClusterFigures c={f.lead} />
          <p className="text-xs text-muted">
            {f.cells === 1 ? "1 significant cell supports it" : `${fmt.count(f.cells)} significant cells support it`}
            {f.facets.length > 0 && `, ${f.facets.length} of them shown below as where it concentrates`}.
          </p>
          {f.facets.length > 0 && (
            <details className="rounded border border-line/70 bg-paper/50 p-2 text-sm">
              <summary className="cursor-pointer font-semibold">Inside this finding ({f.facets.length})</summary>
              <ul className="mt-2 space-y-2" aria-label={`Inside finding ${f.rank}`}>
                {f.facets.map((x) => (
                  <li key={x.cluster.id} className="space-y-1">
                    <Link to={to(x.cluster.id)} className="text-accent hover:underline">
                      {x.words}
                    </Link>
                    {x.kind === "same-failures" && <span className="text-xs text-muted"> (mostly the same failures, seen through other dimensions)</span>}
                    <ClusterFigures c={x.cluster} />
                  </li>
                ))}
              </ul>
            </details>
          )}
        </div>
      </div>
    </article>
  );
}
