import { hourBandLabel, temperatureBandLabel } from "@shared/bands";
import type { ClusterSnapshot, RepairLineEvidence } from "@shared/schemas/claims";
import { useFormat } from "@/lib/use-format";

export function ClusterStats({ snap }: { snap: ClusterSnapshot }) {
  const c = snap.cluster;
  const d = c.dimensions;
  const items: [string, string][] = [
    ["Observed", String(c.observed)],
    ["Expected", c.expected.toFixed(1)],
    ["Observed ÷ expected", `${c.ratio.toFixed(2)} (95 % ${c.lower.toFixed(2)}–${c.upper.toFixed(2)})`],
    ["p / q", `${c.pValue.toExponential(1)} / ${c.qValue.toExponential(1)}`],
    ["Engine family", d.engineFamily],
    ["Build", d.build === "all" ? "all builds" : `${d.build.from} to ${d.build.to}`],
    ["Supplier lot", d.supplierLot],
    ["Shop · temperature · hours", `${d.shop} · ${d.temperatureBand === "all" ? "all" : temperatureBandLabel(d.temperatureBand)} · ${d.hourBand === "all" ? "all" : hourBandLabel(d.hourBand)}`],
  ];
  return (
    <div className="space-y-2 text-sm" data-testid="cluster-stats">
      <p className="font-semibold">{c.description}</p>
      <dl className="grid grid-cols-2 gap-2 md:grid-cols-4">
        {items.map(([k, v]) => (
          <div key={k}><dt className="text-xs uppercase tracking-wide text-muted">{k}</dt><dd className="tabular-nums">{v}</dd></div>
        ))}
      </dl>
      <p className="text-xs text-muted"><b>How:</b> {snap.method}</p>
      <p className="text-xs text-muted"><b>Caution:</b> {snap.caution} Statistics as taken on {snap.takenAt.slice(0, 10)}.</p>
    </div>
  );
}

/** The repair lines of a campaign case, with each line's eligibility. */
export function CaseLines({ lines }: { lines: readonly RepairLineEvidence[] }) {
  const f = useFormat();
  return (
    <div className="max-h-96 overflow-auto">
      <table className="w-full text-left text-sm" aria-label="Repair lines in the case">
        <thead className="sticky top-0 border-b border-line bg-card text-xs text-muted">
          <tr><th className="py-1">RO / line</th><th>Shop</th><th>Serial</th><th>Model</th><th>Opened</th><th className="text-right">Hours</th><th className="pl-4">Eligibility</th><th className="text-right">Parts + labour</th></tr>
        </thead>
        <tbody>
          {lines.map((l) => (
            <tr key={l.id} className="border-b border-line/50">
              <td className="py-1">{l.roNumber}/{l.lineNo}</td>
              <td>{l.shopCode}</td>
              <td>{l.machine.serial}</td>
              <td>{l.machine.modelLine}</td>
              <td>{l.openedDate}</td>
              <td className="text-right tabular-nums">{f.quantity("hours", l.hourMeter)}</td>
              <td title={l.eligibility.summary} className={"pl-4 " + (l.eligibility.verdict === "covered" ? "text-ok" : l.eligibility.verdict === "unknown" ? "text-ochre" : "text-alert")}>
                {l.eligibility.verdict === "covered" ? "covered" : l.eligibility.verdict === "unknown" ? "cannot tell" : `no: ${l.eligibility.endedBy} limit`}
              </td>
              <td className="text-right tabular-nums">{f.money((l.partsCost ?? 0) + (l.laborCost ?? 0))}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
