import type { RepairLineEvidence } from "@shared/schemas/claims";
import { useFormat } from "@/lib/use-format";

const verdictTone = (v: string) => (v === "good" || v === "healthy" || v === "covered" ? "text-ok" : v === "watch" || v === "unknown" ? "text-ochre" : "text-alert");

export function EligibilityPanel({ line }: { line: RepairLineEvidence }) {
  const e = line.eligibility;
  return (
    <div className="space-y-1 text-sm" data-testid="eligibility">
      <p className={`font-semibold ${verdictTone(e.verdict)}`}>{e.summary}</p>
      <p><span className="text-muted">Months:</span> {e.monthsCheck.text}</p>
      <p><span className="text-muted">Hours:</span> {e.hoursCheck.text}</p>
      {line.hoursAtRisk && <p role="note" className="font-semibold text-alert">At risk: {line.hoursAtRisk}</p>}
      <p className="text-xs text-muted">{e.termsSource}</p>
    </div>
  );
}

function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-xs uppercase tracking-wide text-muted">{label}</dt>
      <dd>{children}</dd>
    </div>
  );
}

/** Machine, repair order and parts/labour of one line. */
export function LineFacts({ line }: { line: RepairLineEvidence }) {
  const f = useFormat();
  const l = line;
  return (
    <div className="space-y-3 text-sm">
      <dl className="grid grid-cols-2 gap-3 md:grid-cols-4">
        <Fact label="Serial">{l.machine.serial}</Fact>
        <Fact label="Model line">{l.machine.modelLine} <span className="text-muted">({l.machine.modelCode})</span></Fact>
        <Fact label="Engine family">{l.machine.engineFamily}</Fact>
        <Fact label="Engine serial">{l.machine.engineSerial ?? "–"}</Fact>
        <Fact label="Build date">{l.machine.buildDate ?? "–"}</Fact>
        <Fact label="Delivery date">{l.machine.deliveryDate ?? "–"}</Fact>
        <Fact label="Hour meter">{l.hourMeter === null ? "not recorded" : `${f.quantity("hours", l.hourMeter)} h`}</Fact>
        <Fact label="Plug lot at build">{l.machine.heaterPlugLot ?? "–"}</Fact>
        <Fact label="Repair order">{l.roNumber} / line {l.lineNo} <span className="text-muted">at {l.shopCode}</span></Fact>
        <Fact label="Opened – closed">{l.openedDate} – {l.closedDate ?? "open"}</Fact>
        <Fact label="Component">{l.component.name}</Fact>
        <Fact label="Fault codes (SPN / FMI)">{l.faultCodes.length ? l.faultCodes.map((f) => `${f.spn} / ${f.fmi}`).join(", ") : "none"}</Fact>
      </dl>
      {line.hourTrail && line.hourTrail.length > 0 && (
        <details>
          <summary className="cursor-pointer text-sm text-accent">Hour-meter readings around the failure ({line.hourTrail.length})</summary>
          <table className="mt-1 text-sm" aria-label="Hour-meter readings">
            <thead className="text-xs text-muted"><tr><th className="pr-4 text-left">Date</th><th className="pr-4 text-right">Hours</th><th className="pr-4 text-left">Source</th><th className="text-left">Kept</th></tr></thead>
            <tbody>
              {line.hourTrail.map((r, i) => (
                <tr key={i} className={r.thisRepair ? "font-semibold" : ""}>
                  <td className="pr-4">{r.date}{r.thisRepair && " (this RO)"}</td>
                  <td className="pr-4 text-right tabular-nums">{f.quantity("hours", r.hours)}</td>
                  <td className="pr-4">{r.source}</td>
                  <td className={r.valid ? "" : "text-alert"}>{r.valid ? "yes" : `no: ${r.invalidReason ?? ""}`}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </details>
      )}
      <dl className="grid gap-2 md:grid-cols-3">
        <Fact label="Complaint">{l.complaint ?? "–"}</Fact>
        <Fact label="Cause">{l.cause ?? "–"}</Fact>
        <Fact label="Correction">{l.correction ?? "–"}</Fact>
      </dl>
      {/* money carries its currency sign: on a phone the eight columns scroll inside the card, not the page */}
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm">
          <thead className="border-b border-line text-xs text-muted">
            <tr><th className="py-1">Part</th><th>Lot</th><th className="text-right">Qty</th><th className="pl-3">Labour op</th><th className="text-right">Standard h</th><th className="text-right">Actual h</th><th className="text-right">Parts</th><th className="text-right">Labour</th></tr>
          </thead>
          <tbody>
            <tr>
              <td className="py-1">{l.partNumber ?? "–"} <span className="text-muted">{l.partDescription}</span></td>
              <td>{l.supplierLot ?? "–"}</td>
              <td className="text-right tabular-nums">{f.quantity("plain", l.partQty)}</td>
              <td className="pl-3">{l.laborOp ?? "–"}</td>
              <td className="text-right tabular-nums">{f.quantity("plain", l.standardHours)}</td>
              <td className="text-right tabular-nums">{f.quantity("plain", l.laborHours)}</td>
              <td className="text-right tabular-nums">{f.money(l.partsCost)}</td>
              <td className="text-right tabular-nums">{f.money(l.laborCost)}</td>
            </tr>
          </tbody>
        </table>
      </div>
    </div>
  );
}

/** Readings with their interpretation (shared/measurement-interpretation, computed by the server). */
export function MeasurementPanel({ line }: { line: RepairLineEvidence }) {
  const f = useFormat();
  const m = line.interpretation;
  if (!m.compression && !m.plugs.length && !m.rail.length && !m.battery.length) return <p className="text-sm text-muted">No readings were recorded on this line.</p>;
  const c = m.compression;
  return (
    <div className="space-y-4 text-sm" data-testid="measurements">
      {c && (
        <div>
          <h3 className="font-semibold">Compression per cylinder (psi, mean of the attempts)</h3>
          <table className="mt-1 w-full text-left">
            <thead className="border-b border-line text-xs text-muted"><tr><th className="py-1">Cylinder</th><th>Attempts</th><th className="text-right">Mean</th><th className="pl-4">Band</th><th className="pl-4">Threshold from</th></tr></thead>
            <tbody>
              {c.cylinders.map((y) => (
                <tr key={y.position} className="border-b border-line/50">
                  <td className="py-1">{y.position}</td>
                  <td className="tabular-nums">{y.attempts.map((a) => f.count(a)).join(" / ")}</td>
                  <td className="text-right tabular-nums">{f.count(y.mean)}</td>
                  <td className={`pl-4 ${verdictTone(y.verdict)}`}>{y.band}</td>
                  <td className="pl-4 text-xs text-muted">{y.source}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="mt-2">
            Average <b>{f.withUnit(c.average, "psi")}</b>; lowest cylinder {c.lowest.position} at <b className={verdictTone(c.lowest.verdict)}>{f.withUnit(c.lowest.mean, "psi")}</b> (the engine is rated by it);
            spread ({f.count(c.highest.mean)} − {f.count(c.lowest.mean)}) ÷ {f.count(c.highest.mean)} = <b className={verdictTone(c.spreadVerdict)}>{f.quantity("percent", c.spread * 100)} %</b> ({c.spreadBand}; threshold from {c.spreadSource}); {c.pattern.meaning} ({c.pattern.source}).
          </p>
        </div>
      )}
      {m.plugs.length > 0 && (
        <div>
          <h3 className="font-semibold">Heater-plug resistance (cold, disconnected)</h3>
          <ul className="mt-1 space-y-0.5">
            {m.plugs.map((p) => (
              <li key={p.position}>Plug {p.position}: {p.raw} → <span className={verdictTone(p.verdict)}>{p.label}</span> <span className="text-xs text-muted">(threshold from {p.source})</span></li>
            ))}
          </ul>
        </div>
      )}
      {m.rail.length > 0 && (
        <div>
          <h3 className="font-semibold">Preheat rail voltage</h3>
          {m.rail.map((r, i) => <p key={i}>{r.raw} → <span className={verdictTone(r.verdict)}>{r.label}</span> <span className="text-xs text-muted">(threshold from {r.source})</span></p>)}
        </div>
      )}
      {m.battery.length > 0 && <p>Battery: {m.battery.map((b) => f.reading("voltage", b.volts)).join(", ")}</p>}
    </div>
  );
}

export function Cautions({ cautions }: { cautions: readonly string[] }) {
  return (
    <aside aria-label="Safety cautions" className="rounded-lg border border-ochre/60 bg-ochre/10 p-3 text-xs">
      <p className="font-semibold">Safety cautions</p>
      <ul className="mt-1 list-disc space-y-1 pl-4">{cautions.map((c) => <li key={c}>{c}</li>)}</ul>
    </aside>
  );
}
