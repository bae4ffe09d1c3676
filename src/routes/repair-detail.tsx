import { useQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import { repairQueries } from "@/features/repairs/api/repair-queries";
import { meQueries } from "@/features/session/api/me-queries";
import { useTemperatureUnit } from "@/features/filters/hooks/use-temperature-unit";
import { celsiusToFahrenheit } from "@shared/bands";
import { kindName, storedReading } from "@/features/repairs/reading-words";
import { MeasurementPanels } from "@/features/repairs/components/measurement-panels";
import { QueryView } from "@/features/filters/components/query-view";
import { Card } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import type { RepairDetail } from "@shared/schemas/repairs";
import { useFormat } from "@/lib/use-format";


function Facts({ items }: { items: [string, string][] }) {
  return (
    <dl className="grid grid-cols-2 gap-x-4 gap-y-2 text-sm sm:grid-cols-3">
      {items.map(([k, val]) => (
        <div key={k}><dt className="text-xs uppercase tracking-wide text-muted">{k}</dt><dd className="font-semibold">{val}</dd></div>
      ))}
    </dl>
  );
}

function Detail({ d }: { d: RepairDetail }) {
  const fmt = useFormat();
  const v = (x: string | number | null | undefined, unit = "") => (x === null || x === undefined || x === "" ? "—" : `${typeof x === "number" ? fmt.quantity("plain", x) : x}${unit}`);
  const hrs = (x: number | null) => (x === null ? "—" : `${fmt.quantity("hours", x)}\u00a0h`);
  const day = (x: string | null) => (x ? fmt.date(x) : "—");
  const { data: me } = useQuery(meQueries.current());
  const canClaim = Boolean(me?.roles.some((r) => r === "clerk" || r === "manager"));
  const [unit] = useTemperatureUnit();
  const l = d.line;
  const m = d.machine;
  return (
    <div className="space-y-4">
      <div>
        <p className="text-sm text-muted">{l.shopCode} · {l.shopName} · {l.system} › {l.assembly}</p>
        <div className="flex flex-wrap items-start justify-between gap-3">
          <h1 className="text-2xl font-bold">Repair order {l.roNumber}, line {l.lineNo}: {l.componentName}</h1>
          {canClaim && l.lineType === "failure" && (
            <Link to={`/claims/new?repairLine=${encodeURIComponent(l.id)}`} className="rounded bg-accent px-3 py-2 text-sm font-semibold text-white">
              Open a warranty claim
            </Link>
          )}
        </div>
      </div>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-3">
        <Card title="Complaint, cause, correction">
          <dl className="space-y-2 text-sm">
            <div><dt className="text-xs uppercase text-muted">Complaint</dt><dd>{v(l.complaint)}</dd></div>
            <div><dt className="text-xs uppercase text-muted">Cause</dt><dd>{v(l.cause)}{l.failureMode ? ` (${l.failureMode})` : ""}</dd></div>
            <div><dt className="text-xs uppercase text-muted">Correction</dt><dd>{v(l.correction)}</dd></div>
          </dl>
        </Card>
        <Card title="The job">
          <Facts items={[
            ["Opened", day(l.openedDate)], ["Closed", day(l.closedDate)], ["Line type", l.lineType], ["Pay type", l.payType],
            ["Hour meter", hrs(l.hourMeter)], ["Labour op", v(l.laborOp)], ["Labour", v(l.laborHours, "\u00a0h")], ["Standard", v(l.standardHours, "\u00a0h")],
            ["Technician", v(l.technician)], ["Ambient", l.ambientTempC === null ? "—" : unit === "F" ? `${fmt.count(celsiusToFahrenheit(l.ambientTempC))}\u00a0°F` : `${fmt.count(l.ambientTempC)}\u00a0°C`],
          ]} />
        </Card>
        <Card title="Part">
          <Facts items={[
            ["Part", v(l.partNumber)], ["Description", v(l.partDescription)], ["Quantity", v(l.partQty)], ["Supplier lot", v(l.supplierLot)],
            ["Ordered", day(l.partOrderedDate)], ["Received", day(l.partReceivedDate)], ["Back-ordered", l.backOrdered ? "yes" : "no"], ["Wait", l.partsWaitDays === null ? "—" : `${fmt.count(l.partsWaitDays)} ${l.partsWaitDays === 1 ? "day" : "days"}`],
          ]} />
        </Card>
      </div>
      <Card title={`Machine ${m.serial}`}>
        <Facts items={[
          ["Model", `${m.modelLine} (${m.modelCode})`], ["Engine family", m.engineFamily], ["Engine serial", v(m.engineSerial)], ["Cold-start aid", m.coldStartAid.replace("_", " ")],
          ["Built", day(m.buildDate)], ["Delivered", day(m.deliveryDate)], ["Hours at delivery", hrs(m.deliveryHours)], ["Home shop", v(m.homeShop)],
          ["Heater-plug lot at build", v(m.heaterPlugLot)], ["Block heater", m.blockHeaterFitted ? "fitted" : "none"],
        ]} />
        <details className="mt-3">
          <summary className="cursor-pointer text-sm font-semibold text-accent">Hour-meter trail ({fmt.count(m.hoursTrail.length)} {m.hoursTrail.length === 1 ? "reading" : "readings"})</summary>
          <div className="mt-2 max-h-72 overflow-auto">
            <table className="w-full text-left text-sm">
              <thead className="sticky top-0 bg-card text-muted"><tr className="border-b border-line"><th className="py-1 pr-3">Date</th><th className="pr-3 text-right">Hours (h)</th><th className="pr-3">Source</th><th className="pr-3">Meter</th><th>Note</th></tr></thead>
              <tbody>
                {m.hoursTrail.map((h, i) => (
                  <tr key={i} className={`border-b border-line/60 ${h.valid ? "" : "text-alert"}`}>
                    <td className="py-1 pr-3 tabular-nums">{day(h.date)}</td>
                    <td className="pr-3 text-right tabular-nums">{fmt.quantity("hours", h.hours)}</td>
                    <td className="pr-3">{h.source}</td>
                    <td className="pr-3">{h.meterGeneration === 0 ? "original" : `replacement ${h.meterGeneration}`}</td>
                    <td>{h.valid ? (h.meterNote ?? "") : `set aside: ${h.invalidReason ?? "invalid"}`}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </details>
      </Card>
      <Card title="Fault codes (SAE J1939 SPN / FMI)">
        {d.faultCodes.length === 0 ? (
          <p className="text-sm text-muted">No fault codes recorded on this line.</p>
        ) : (
          <ul className="space-y-1 text-sm">
            {d.faultCodes.map((f) => (
              <li key={`${f.spn}-${f.fmi}`}><b className="tabular-nums">SPN {f.spn} FMI {f.fmi}</b> — {f.fmiMeaning}{f.occurrences > 1 ? ` (×${fmt.count(f.occurrences)})` : ""}</li>
            ))}
          </ul>
        )}
      </Card>
      <MeasurementPanels d={d} />
      {d.measurements.length > 0 && (
        <details className="rounded-lg border border-line bg-card p-4">
          <summary className="cursor-pointer text-sm font-semibold">All readings as recorded and as stored ({fmt.count(d.measurements.length)})</summary>
          <div className="mt-2 overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="text-muted"><tr className="border-b border-line"><th className="py-1 pr-3">Kind</th><th className="pr-3">Position</th><th className="pr-3">Attempt</th><th className="pr-3">Recorded</th><th className="pr-3">Stored (warehouse unit)</th><th className="pr-3">Conversion</th><th>Source</th></tr></thead>
            <tbody>
              {d.measurements.map((x, i) => (
                <tr key={i} className="border-b border-line/60">
                  <td className="py-1 pr-3">{kindName(x.kind)}</td><td className="pr-3">{x.position}</td><td className="pr-3">{x.attempt}</td>
                  <td className="pr-3">{x.rawValue}{x.rawUnit ? ` ${x.rawUnit}` : ""}</td>
                  <td className="pr-3 tabular-nums">{storedReading(x, fmt, unit)}</td><td className="pr-3 text-muted">{x.conversionRule}</td>
                  <td className="text-muted">{x.sheet ? `bench sheet, ${x.sheet.by}, ${fmt.dateTime(x.sheet.at)}` : "shop export"}</td>
                </tr>
              ))}
            </tbody>
          </table>
          </div>
        </details>
      )}
      {d.machineHistory.length > 0 && (
        <Card title="Other repair lines on this machine">
          <ul className="space-y-1 text-sm">
            {d.machineHistory.map((h) => (
              <li key={h.id}><Link to={`/repairs/${h.id}`} className="text-accent hover:underline">{day(h.openedDate)} · {h.shopCode} {h.roNumber}/{h.lineNo}</Link> — {h.componentName} ({h.lineType}{h.hourMeter !== null ? `, ${hrs(h.hourMeter)}` : ""})</li>
            ))}
          </ul>
        </Card>
      )}
    </div>
  );
}

// awaited: one repair line is a quick lookup, and a line that is missing or out of scope reaches the
// repairs area's error boundary before the page renders
export const primeCache: PrimeCache = (qc, { params }) => qc.ensureQueryData(repairQueries.detail(params.id ?? ""));

export function Component() {
  const { id = "" } = useParams();
  const q = useQuery(repairQueries.detail(id));
  return (
    <div className="space-y-4">
      <Link to="/repairs" className="text-sm text-accent">← Repairs</Link>
      <QueryView query={q} label="the repair line" lines={10}>{(d) => <Detail d={d} />}</QueryView>
    </div>
  );
}
