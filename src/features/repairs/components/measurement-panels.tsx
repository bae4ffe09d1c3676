import { useQuery } from "@tanstack/react-query";
import { useTemperatureUnit } from "@/features/filters/hooks/use-temperature-unit";
import { usePressureUnit } from "@/features/filters/hooks/use-pressure-unit";
import { PressureUnitSelect } from "@/features/filters/components/pressure-unit-select";
import { useFormat } from "@/lib/use-format";
import { pressuresIn } from "@shared/format";
import { codedWords, kindName, sheetProvenance, storedReading } from "../reading-words";
import {
  classifyPlug,
  classifyRailVoltage,
  compressionBands,
  safetyCautionsIn,
  spreadBands,
  summariseCompression,
  type Verdict,
} from "@shared/measurement-interpretation";
import type { RepairDetail, RepairMeasurement } from "@shared/schemas/repairs";
import { familyCompressionOf, familyPlugLimitOf, type EngineSpec } from "@shared/schemas/engine-specs";
import { thresholdSourceWords } from "@shared/threshold-source";
import { engineSpecQueries } from "../api/engine-spec-queries";

const tone: Record<string, string> = {
  good: "bg-ok/10 text-ok", healthy: "bg-ok/10 text-ok", watch: "bg-ochre/15 text-ink", high: "bg-ochre/15 text-ink", suspect: "bg-ochre/15 text-ink",
  fault: "bg-alert/10 text-alert", open: "bg-alert/10 text-alert", short: "bg-alert/10 text-alert",
};
function Verdict({ v, children }: { v: Verdict | string; children: React.ReactNode }) {
  return <span className={`rounded px-1.5 py-0.5 text-xs font-semibold ${tone[v] ?? ""}`}>{children}</span>;
}
const Source = ({ p }: { p: string }) => <span className="text-xs text-muted">({p})</span>;
const raw = (m: RepairMeasurement) => `${m.rawValue}${m.rawUnit ? ` ${m.rawUnit}` : ""}`;

function Compression({ readings, spec }: { readings: RepairMeasurement[]; spec: EngineSpec | null }) {
  const fmt = useFormat();
  const [unit] = usePressureUnit();
  // stored in psi (the warehouse's canonical unit), shown in the reader's
  const num = (psi: number) => fmt.pressureNumber(psi, "psi", unit);
  const withUnit = (psi: number) => fmt.pressure(psi, "psi", unit);
  const words = (text: string) => pressuresIn(text, fmt, unit);
  const byCyl = new Map<number, RepairMeasurement[]>();
  for (const r of readings) if (r.value !== null) byCyl.set(r.position, [...(byCyl.get(r.position) ?? []), r]);
  const family = spec ? familyCompressionOf(spec) : null;
  const familyWords = family ? thresholdSourceWords(family.source) : null;
  const s = summariseCompression([...byCyl].map(([position, rs]) => ({ position, attempts: rs.map((r) => r.value!) })), family);
  if (!s) return <p className="text-sm text-muted">No compression recorded on this line.</p>;
  const maxAttempts = Math.max(...s.cylinders.map((c) => c.attempts.length));
  return (
    <div className="space-y-2">
      <table className="w-full text-left text-sm" aria-label="Compression per cylinder">
        <thead className="text-muted">
          <tr className="border-b border-line">
            <th className="py-1 pr-3">Cylinder</th>
            {Array.from({ length: maxAttempts }, (_, i) => <th key={i} className="pr-3 text-right">Attempt {i + 1} ({unit})</th>)}
            <th className="pr-3 text-right">Mean ({unit})</th>
            <th>Reading</th>
          </tr>
        </thead>
        <tbody>
          {s.cylinders.map((c) => (
            <tr key={c.position} className="border-b border-line/60">
              <td className="py-1 pr-3 font-semibold">{c.position}</td>
              {Array.from({ length: maxAttempts }, (_, i) => {
                const m = byCyl.get(c.position)?.[i];
                return <td key={i} className="pr-3 text-right tabular-nums" title={m ? `recorded ${raw(m)}; ${m.conversionRule}` : undefined}>{c.attempts[i] === undefined ? "—" : num(c.attempts[i])}</td>;
              })}
              <td className="pr-3 text-right font-semibold tabular-nums">{num(c.mean)}</td>
              <td><Verdict v={c.verdict}>{c.verdict}</Verdict> <span className="text-xs">{words(c.band)}</span> <Source p={familyWords ?? compressionBands.find((b) => b.label === c.band)?.provenance ?? ""} /></td>
            </tr>
          ))}
        </tbody>
      </table>
      <dl className="grid gap-2 text-sm sm:grid-cols-3">
        <div className="rounded border border-line p-2"><dt className="text-xs uppercase text-muted">Average</dt><dd className="font-semibold tabular-nums">{withUnit(s.average)}</dd></div>
        <div className="rounded border border-line p-2"><dt className="text-xs uppercase text-muted">Lowest (rates the engine)</dt><dd className="font-semibold tabular-nums">cylinder {s.lowest.position}: {withUnit(s.lowest.mean)} <Verdict v={s.lowest.verdict}>{s.lowest.verdict}</Verdict></dd></div>
        <div className="rounded border border-line p-2"><dt className="text-xs uppercase text-muted">Spread between cylinders</dt><dd className="font-semibold tabular-nums">{fmt.percent(s.spread)} <Verdict v={s.spreadVerdict}>{s.spreadVerdict}</Verdict></dd><dd className="text-xs">{s.spreadBand} <Source p={spreadBands.find((b) => b.label === s.spreadBand)?.provenance ?? ""} /></dd></div>
      </dl>
      <p className="text-sm">Pattern: {words(s.pattern.meaning)} <Source p={s.pattern.provenance} /></p>
      <p className="text-xs text-muted">
        Spread = (highest − lowest) ÷ highest of the cylinder means.{" "}
        {spec && familyWords
          ? `Cylinders judged against ${spec.engineFamily}'s own figures: target ${withUnit(spec.targetMinPsi)}–${withUnit(spec.targetMaxPsi)}, allowable minimum ${withUnit(spec.allowableMinPsi)}, from ${familyWords}; spread and pattern on the general bands.`
          : `Bands: ${compressionBands.map((b) => `${words(b.label)} (${b.provenance})`).join("; ")}.`}
        {unit === "psi" ? "" : " Figures converted with the NIST SP 811 factors."}
      </p>
    </div>
  );
}

function Plugs({ readings, spec }: { readings: RepairMeasurement[]; spec: EngineSpec | null }) {
  const fmt = useFormat();
  const limit = familyPlugLimitOf(spec);
  if (!readings.length) return <p className="text-sm text-muted">No heater-plug resistance recorded on this line.</p>;
  const values = readings.map((r) => (r.overRange ? null : r.value));
  return (
    <table className="w-full text-left text-sm" aria-label="Heater-plug resistance">
      <thead className="text-muted"><tr className="border-b border-line"><th className="py-1 pr-3">Plug</th><th className="pr-3">Recorded</th><th className="pr-3 text-right">Resistance</th><th>Reading</th></tr></thead>
      <tbody>
        {readings.map((r, i) => {
          const c = classifyPlug(values[i], values.filter((_, j) => j !== i), limit?.healthyMaxOhms ?? null);
          return (
            <tr key={`${r.position}-${r.attempt}`} className="border-b border-line/60">
              <td className="py-1 pr-3 font-semibold">{r.position || "—"}</td>
              <td className="pr-3" title={r.conversionRule}>{raw(r)}</td>
              <td className="pr-3 text-right tabular-nums">{r.overRange ? "over range" : fmt.reading("resistance", r.value)}</td>
              <td><Verdict v={c.verdict}>{c.verdict}</Verdict> <span className="text-xs">{c.label}</span> <Source p={c.familyFigure && limit ? thresholdSourceWords(limit.source) : c.provenance} /></td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

function Voltages({ readings, hasFaultCode }: { readings: RepairMeasurement[]; hasFaultCode: boolean }) {
  const fmt = useFormat();
  const volts = (r: RepairMeasurement) => (r.value === null ? "over range" : fmt.reading("voltage", r.value));
  const rail = readings.filter((r) => r.kind === "rail_voltage");
  const battery = readings.filter((r) => r.kind === "battery_voltage");
  if (!rail.length && !battery.length) return <p className="text-sm text-muted">No voltage recorded on this line.</p>;
  return (
    <ul className="space-y-1 text-sm">
      {rail.map((r) => {
        const c = r.value !== null ? classifyRailVoltage(r.value, hasFaultCode) : null;
        return (
          <li key={`r${r.position}-${r.attempt}`}>
            Preheat rail, key on: <b className="tabular-nums">{volts(r)}</b> <span className="text-xs text-muted">(recorded {raw(r)})</span>{" "}
            {c && <><Verdict v={c.verdict}>{c.verdict}</Verdict> <span className="text-xs">{c.label}</span> <Source p={c.provenance} /></>}
          </li>
        );
      })}
      {battery.map((r) => (
        <li key={`b${r.position}-${r.attempt}`}>Battery: <b className="tabular-nums">{volts(r)}</b> <span className="text-xs text-muted">(recorded {raw(r)}; not interpreted)</span></li>
      ))}
    </ul>
  );
}

const SHEET_KINDS = ["ambient_temperature", "engine_state", "preheat_lamp", "bench_test"];

/** The conditions and checks a technician recorded at the machine (bench sheet), and who entered them when. */
function AtTheMachine({ d }: { d: RepairDetail }) {
  const fmt = useFormat();
  const [unit] = useTemperatureUnit();
  const checks = d.measurements.filter((m) => SHEET_KINDS.includes(m.kind)).sort((a, b) => SHEET_KINDS.indexOf(a.kind) - SHEET_KINDS.indexOf(b.kind) || a.position - b.position);
  const provenance = sheetProvenance(d.measurements, fmt);
  if (!checks.length && !provenance.length) return null;
  return (
    <section aria-labelledby="m-machine" className="rounded-lg border border-line bg-card p-4">
      <h2 id="m-machine" className="mb-2 font-semibold">Conditions and checks at the machine</h2>
      {checks.length > 0 && (
        <ul className="space-y-1 text-sm">
          {checks.map((m) => (
            <li key={`${m.kind}-${m.position}-${m.attempt}`}>
              {kindName(m.kind)}
              {m.position > 0 ? `, plug ${m.position}` : ""}: <span className="font-medium">{codedWords(m.kind, m.value) ?? storedReading(m, fmt, unit)}</span>
            </li>
          ))}
        </ul>
      )}
      {provenance.map((p) => <p key={p} className="mt-2 text-sm text-muted">{p}</p>)}
    </section>
  );
}

/** The readings of one line, interpreted against the engine family's own figures or the shared bands, with the safety cautions beside them. */
export function MeasurementPanels({ d }: { d: RepairDetail }) {
  const [unit] = useTemperatureUnit();
  // the family's own figures where an admin entered them; the generic bands while they load or when there are none
  const spec = useQuery(engineSpecQueries.current(d.machine.engineFamily)).data?.current ?? null;
  const by = (k: string) => d.measurements.filter((m) => m.kind === k);
  return (
    <div className="grid gap-4 lg:grid-cols-[1fr_20rem]">
      <div className="space-y-4">
        <AtTheMachine d={d} />
        <section aria-labelledby="m-compression" className="rounded-lg border border-line bg-card p-4">
          <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
            <h2 id="m-compression" className="font-semibold">Compression</h2>
            <PressureUnitSelect />
          </div>
          <Compression readings={by("compression")} spec={spec} />
        </section>
        <section aria-labelledby="m-plugs" className="rounded-lg border border-line bg-card p-4">
          <h2 id="m-plugs" className="mb-2 font-semibold">Heater-plug resistance (cold, disconnected)</h2>
          <Plugs readings={by("plug_resistance")} spec={spec} />
        </section>
        <section aria-labelledby="m-volts" className="rounded-lg border border-line bg-card p-4">
          <h2 id="m-volts" className="mb-2 font-semibold">Voltages</h2>
          <Voltages readings={[...by("rail_voltage"), ...by("battery_voltage")]} hasFaultCode={d.faultCodes.length > 0} />
        </section>
      </div>
      <aside aria-labelledby="cautions" className="h-fit rounded-lg border-2 border-ochre bg-ochre/10 p-4 text-sm">
        <h2 id="cautions" className="mb-2 font-semibold">Before you act on these readings</h2>
        <ul className="list-disc space-y-1.5 pl-4">
          {safetyCautionsIn(unit).map((c) => <li key={c}>{c}</li>)}
        </ul>
      </aside>
    </div>
  );
}
