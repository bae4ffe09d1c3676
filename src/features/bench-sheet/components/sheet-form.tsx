import { useMemo } from "react";
import { useFormat } from "@/lib/use-format";
import { cautionsAt, compressionBands } from "@shared/measurement-interpretation";
import { familyOptions, summariseBenchSheet, type BenchSummary, type PartsOutlook } from "@shared/bench-sheet-summary";
import { thresholdSourceWords } from "@shared/threshold-source";
import type { EngineSpec } from "@shared/schemas/engine-specs";
import { pressuresIn, type PressureUnit } from "@shared/format";
import { draftToSheet, fieldIds, parseDecimal, type BenchDraft } from "../draft";
import type { FieldRefusal } from "../hooks/use-bench-draft";
import { Cautions, DecimalInput, Reading, Refusals, Section, Segmented } from "./touch";

interface Props {
  draft: BenchDraft;
  edit: (fn: (d: BenchDraft) => BenchDraft) => void;
  refusals: readonly FieldRefusal[];
  temperatureUnit: "C" | "F";
  parts: PartsOutlook | null;
  /** the engine family's own figures from the maker's manual, or null: the generic bands */
  spec: EngineSpec | null;
}

const PRESSURE_UNITS: readonly { value: PressureUnit; label: string }[] = [{ value: "psi", label: "psi" }, { value: "kPa", label: "kPa" }, { value: "bar", label: "bar" }];
const typedProblem = (typed: string) => (parseDecimal(typed) === "invalid" ? `“${typed}” is not a number: use digits and one decimal point` : null);

/** The bench sheet's fields, each value interpreted beside it as it is typed, with the cautions of the work at each step. */
export function SheetForm({ draft, edit, refusals, temperatureUnit, parts, spec }: Props) {
  const fmt = useFormat();
  const gauge = draft.pressureUnit;
  const inGauge = (psi: number) => fmt.pressure(psi, "psi", gauge);
  const { sheet } = useMemo(() => draftToSheet(draft), [draft]);
  const summary = useMemo(() => summariseBenchSheet(sheet, { parts, pressure: inGauge, ...familyOptions(spec) }), [sheet, parts, spec, gauge, fmt]); // eslint-disable-line react-hooks/exhaustive-deps
  const refusedAt = (field: string) => refusals.filter((r) => r.field === field);
  const describe = (...ids: (string | false | null | undefined)[]) => ids.filter(Boolean).join(" ") || undefined;
  const setPlug = (i: number, patch: Partial<BenchDraft["plugs"][number]>) => edit((d) => ({ ...d, plugs: d.plugs.map((p, j) => (j === i ? { ...p, ...patch } : p)) }));
  const setAttempt = (i: number, j: number, v: string) =>
    edit((d) => ({ ...d, cylinders: d.cylinders.map((c, k) => (k === i ? { ...c, attempts: c.attempts.map((a, m) => (m === j ? v : a)) } : c)) }));
  const addAttempt = (i: number) => edit((d) => ({ ...d, cylinders: d.cylinders.map((c, k) => (k === i && c.attempts.length < 9 ? { ...c, attempts: [...c.attempts, ""] } : c)) }));

  const railBad = typedProblem(draft.rail);
  return (
    <div className="space-y-4">
      <Section id="bench-conditions" title="Conditions">
        <div className="grid gap-3 sm:grid-cols-2">
          <div>
            <label htmlFor="bench-date" className="mb-1 block text-sm font-semibold">Reading date</label>
            <input id="bench-date" type="date" value={draft.readingDate} onChange={(e) => edit((d) => ({ ...d, readingDate: e.target.value }))} className="min-h-11 w-full rounded-lg border-2 border-slate/60 bg-card px-3 text-lg" aria-describedby={describe(refusedAt("readingDate").length > 0 && "bench-date-refused")} />
            <Refusals id="bench-date-refused" items={refusedAt("readingDate")} />
          </div>
          <div>
            <DecimalInput id="bench-hours" label="Hour meter (h)" value={draft.hourMeter} onChange={(v) => edit((d) => ({ ...d, hourMeter: v }))} unit="h" invalid={!!typedProblem(draft.hourMeter) || refusedAt(fieldIds.hourMeter).length > 0} describedBy={describe("bench-hours-refused", "bench-hours-problem")} />
            {typedProblem(draft.hourMeter) && <p id="bench-hours-problem" className="mt-1 text-sm font-semibold text-alert">{typedProblem(draft.hourMeter)}</p>}
            <Refusals id="bench-hours-refused" items={refusedAt(fieldIds.hourMeter)} />
          </div>
          <div>
            <DecimalInput id="bench-ambient" label={`Ambient temperature (°${draft.ambientUnit})`} value={draft.ambient} onChange={(v) => edit((d) => ({ ...d, ambient: v }))} invalid={!!typedProblem(draft.ambient) || refusedAt(fieldIds.ambient).length > 0} describedBy={describe("bench-ambient-reading", "bench-ambient-refused")} />
            <div className="mt-1.5">
              <Segmented hideLegend legend="Temperature unit" name="ambient-unit" value={draft.ambientUnit} options={[{ value: "C", label: "°C" }, { value: "F", label: "°F" }]} onChange={(u) => edit((d) => ({ ...d, ambientUnit: u }))} />
            </div>
            <p id="bench-ambient-reading" className="mt-1 text-sm">
              {typedProblem(draft.ambient) ?? (summary.coldShop === null ? "" : summary.coldShop ? "Below about −7 °C (20 °F): a hard cold start is expected of a weak preheat (common practice, no source)." : "Above about −7 °C (20 °F).")}
            </p>
            <Refusals id="bench-ambient-refused" items={refusedAt(fieldIds.ambient)} />
          </div>
          <Segmented legend="Engine" name="engine" value={draft.engine} options={[{ value: "cold", label: "Cold" }, { value: "warm", label: "Warm" }]} onChange={(v) => edit((d) => ({ ...d, engine: v }))} />
        </div>
        <Cautions items={cautionsAt("cold-start", temperatureUnit)} title="Cold start: before you try it" />
      </Section>

      <Section id="bench-rail" title="Preheat rail, key on">
        <div className="grid gap-3 sm:grid-cols-2">
          <div>
            <DecimalInput id="bench-rail-volts" label="Rail voltage (V)" unit="V" value={draft.rail} onChange={(v) => edit((d) => ({ ...d, rail: v }))} invalid={!!railBad || refusedAt(fieldIds.rail).length > 0} describedBy="bench-rail-reading bench-rail-refused" />
            <Reading id="bench-rail-reading" verdict={railBad ? null : summary.rail?.verdict ?? null} source={railBad ? null : summary.rail?.provenance}>
              {railBad ?? (summary.rail ? summary.rail.label : "Measure at the rail with the key on, while the plugs are energised.")}
            </Reading>
            <Refusals id="bench-rail-refused" items={refusedAt(fieldIds.rail)} />
          </div>
          <div>
            <Segmented legend="Wait-to-start lamp" name="preheat-lamp" value={draft.preheatLamp === null ? null : draft.preheatLamp ? "lit" : "dark"} options={[{ value: "lit", label: "Lit" }, { value: "dark", label: "Not lit" }]} onChange={(v) => edit((d) => ({ ...d, preheatLamp: v === "lit" }))} describedBy="bench-lamp-reading" />
            <p id="bench-lamp-reading" className="mt-1 text-sm">{summary.rail?.lamp ?? (draft.preheatLamp === null ? "Did the dash ask you to wait for preheat?" : "")}</p>
          </div>
        </div>
        <Cautions items={cautionsAt("rail", temperatureUnit)} />
      </Section>

      <Section id="bench-plugs" title="Heater plugs: resistance (cold, disconnected)">
        <ol className="space-y-4">
          {draft.plugs.map((p, i) => {
            const r = summary.plugs[i];
            const bad = p.ol ? null : typedProblem(p.value);
            const id = `bench-plug-${p.position}`;
            return (
              <li key={p.position} className="rounded-lg border border-line p-3">
                <div className="flex flex-wrap items-end gap-2">
                  <div className="min-w-32 flex-1">
                    <DecimalInput id={id} label={`Plug ${p.position} resistance`} value={p.ol ? "" : p.value} disabled={p.ol} onChange={(v) => setPlug(i, { value: v })} invalid={!!bad || refusedAt(fieldIds.plug(i)).length > 0} describedBy={`${id}-reading ${id}-refused`} />
                  </div>
                  <Segmented hideLegend legend={`Plug ${p.position} meter unit`} name={`${id}-unit`} value={p.ol ? null : p.unit} options={[{ value: "ohm", label: "Ω" }, { value: "kohm", label: "kΩ" }]} onChange={(u) => setPlug(i, { unit: u, ol: false })} />
                  <button type="button" aria-pressed={p.ol} onClick={() => setPlug(i, { ol: !p.ol })} className={`min-h-11 min-w-11 rounded-lg border-2 px-3 text-base font-semibold ${p.ol ? "border-alert bg-alert text-white" : "border-line bg-card"}`} aria-label={`Plug ${p.position} reads OL (over limit)`}>
                    OL
                  </button>
                </div>
                <Reading id={`${id}-reading`} verdict={bad ? null : r?.verdict ?? null} source={bad || r?.familyFigure ? null : r?.provenance}>
                  {bad ?? (r?.label ?? "Enter the meter's reading, or OL when it shows over limit.")}
                </Reading>
                <Refusals id={`${id}-refused`} items={refusedAt(fieldIds.plug(i))} />
                <div className="mt-3">
                  <Segmented legend={`Plug ${p.position} bench test`} name={`${id}-bench`} value={p.bench} options={[{ value: "heats", label: "Heats" }, { value: "no_heat", label: "No heat" }, { value: "not_tested", label: "Not tested" }]} onChange={(b) => setPlug(i, { bench: b })} describedBy={`${id}-bench-reading`} />
                  <p id={`${id}-bench-reading`} className="mt-1 text-sm">{r?.benchWords}{r?.conflict ? `; ${r.conflict}` : ""}</p>
                  <Refusals items={refusedAt(`plugs.${i}.bench`)} />
                </div>
              </li>
            );
          })}
        </ol>
        <Cautions items={cautionsAt("resistance", temperatureUnit)} title="Before you measure" />
        <Cautions items={cautionsAt("bench", temperatureUnit)} title="Before the bench test" />
      </Section>

      <Section
        id="bench-compression"
        title="Compression"
        aside={<Segmented hideLegend legend="Gauge unit" name="gauge-unit" value={gauge} options={PRESSURE_UNITS} onChange={(u) => edit((d) => ({ ...d, pressureUnit: u }))} />}
      >
        <p className="mb-3 text-sm text-muted">Through the plug hole, all plugs out, injectors disabled; several attempts per cylinder. Values are read in the gauge's unit ({gauge}).</p>
        <ol className="space-y-4">
          {draft.cylinders.map((c, i) => {
            const r = summary.compression?.cylinders.find((x) => x.position === c.position);
            const id = `bench-cyl-${c.position}`;
            return (
              <li key={c.position} className="rounded-lg border border-line p-3">
                <h3 className="mb-2 font-semibold">Cylinder {c.position}</h3>
                <div className="grid grid-cols-3 gap-2">
                  {c.attempts.map((a, j) => {
                    const bad = typedProblem(a);
                    const refused = refusedAt(fieldIds.attempt(i, j));
                    return (
                      <div key={j}>
                        <DecimalInput id={`${id}-a${j + 1}`} label={`Cylinder ${c.position}, attempt ${j + 1} (${gauge})`} value={a} onChange={(v) => setAttempt(i, j, v)} invalid={!!bad || refused.length > 0} describedBy={`${id}-reading ${id}-a${j + 1}-problem`} />
                        {(bad || refused.length > 0) && (
                          <div id={`${id}-a${j + 1}-problem`}>
                            {bad && <p className="mt-1 text-sm font-semibold text-alert">{bad}</p>}
                            <Refusals items={refused} />
                          </div>
                        )}
                      </div>
                    );
                  })}
                </div>
                <div className="mt-2 flex flex-wrap items-center justify-between gap-2">
                  <Reading id={`${id}-reading`} verdict={r?.verdict ?? null} source={spec ? null : r?.provenance}>
                    {r ? `mean ${inGauge(r.mean)}, lowest attempt ${inGauge(r.lowestAttempt)}, attempts within ${fmt.percent(r.attemptSpread)}: ${pressuresIn(r.band, fmt, gauge)}` : "Enter at least one attempt."}
                  </Reading>
                  {c.attempts.length < 9 && (
                    <button type="button" onClick={() => addAttempt(i)} className="min-h-11 rounded-lg border-2 border-slate/60 bg-card px-3 font-semibold">
                      Add attempt<span className="sr-only"> to cylinder {c.position}</span>
                    </button>
                  )}
                </div>
              </li>
            );
          })}
        </ol>
        {summary.compression && <EngineCompression s={summary} inGauge={inGauge} />}
        <p className="mt-2 text-xs text-muted">
          {spec
            ? `${spec.engineFamily}'s own figures: target ${inGauge(spec.targetMinPsi)}–${inGauge(spec.targetMaxPsi)}, allowable minimum ${inGauge(spec.allowableMinPsi)}, from ${thresholdSourceWords(familyOptions(spec).limits!.source)}.`
            : `Bands: ${compressionBands.map((b) => `${pressuresIn(b.label, fmt, gauge)} (${b.provenance})`).join("; ")}.`}{" "}
          Gauge readings in kPa or bar are compared in psi with the NIST SP 811 factors.
        </p>
        <Cautions items={cautionsAt("compression", temperatureUnit)} title="Before you crank" />
      </Section>
    </div>
  );
}

function EngineCompression({ s, inGauge }: { s: BenchSummary; inGauge: (psi: number) => string }) {
  const fmt = useFormat();
  const c = s.compression!;
  return (
    <dl className="mt-4 grid gap-2 text-sm sm:grid-cols-3" aria-label="Compression of the engine">
      <div className="rounded-lg border border-line p-2"><dt className="text-xs font-semibold uppercase text-muted">Average</dt><dd className="text-base font-bold tabular-nums">{inGauge(c.average)}</dd></div>
      <div className="rounded-lg border border-line p-2"><dt className="text-xs font-semibold uppercase text-muted">Lowest cylinder (rates the engine)</dt><dd className="text-base font-bold tabular-nums">cylinder {c.lowest.position}: {inGauge(c.lowest.mean)}</dd></div>
      <div className="rounded-lg border border-line p-2"><dt className="text-xs font-semibold uppercase text-muted">Spread between cylinders</dt><dd className="text-base font-bold tabular-nums">{fmt.percent(c.spread)}</dd><dd className="text-xs">{c.spreadBand}; {c.pattern.meaning}</dd></div>
    </dl>
  );
}
