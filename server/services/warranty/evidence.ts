/** A repair line as warranty evidence: its readings interpreted, its eligibility and filing deadline, and sums over lines. */
import { classifyPlug, classifyRailVoltage, compressionBands, spreadBands, summariseCompression, type Provenance } from "../../../shared/measurement-interpretation.js";
import { generalSource, thresholdSourceWords } from "../../../shared/threshold-source.js";
import { familyCompressionOf, familyPlugLimitOf, type EngineSpec } from "../../../shared/schemas/engine-specs.js";
import type { EligibilityView, Interpretation, RepairLineEvidence } from "../../../shared/schemas/claims.js";
import type { FaultCodeRow, HourReadingRow, MeasurementRow, PolicyRow, RepairLineRow } from "../../db/queries/claims.js";
import { coverageClassFor, DEFAULT_TERMS, eligibility, termsFor, termsSourceWords, type PolicyCoverage } from "./eligibility.js";
import { filingDeadline } from "./deadline.js";

const num = (v: string | number | null | undefined): number | null => (v === null || v === undefined || v === "" ? null : Number(v));

/** Rail voltages at or near zero with an open-circuit/low-voltage code point at the fuse or relay (FMI 4/5, from memory). */
const hasPreheatCode = (faults: readonly FaultCodeRow[]) => faults.some((f) => f.fmi === 4 || f.fmi === 5);

/**
 * Where a band's threshold comes from, in words for the maker. A generic band is Ironledger's own (a rule of
 * thumb or a recalled value, by its provenance tag) and reads as general service practice; an engine family's
 * own figures name the maker's service manual, the family's version and who entered them (shared/threshold-source.ts).
 */
const sourceOf = (provenance: Provenance) => thresholdSourceWords(generalSource(provenance));
const bandSource = (label: string) => sourceOf(compressionBands.find((b) => b.label === label)?.provenance ?? "common practice, no source");

/**
 * The readings of one repair line, interpreted: compression per cylinder (mean of attempts, average,
 * lowest, spread, pattern), each heater plug's resistance against its siblings, rail and battery voltage;
 * each verdict with where its threshold comes from, in words. With the engine family's own figures (`spec`), the
 * cylinders and the plugs' healthy maximum are judged against them and name them as their source.
 */
export function interpretMeasurements(ms: readonly MeasurementRow[], faults: readonly FaultCodeRow[], spec: EngineSpec | null = null): Interpretation {
  const family = spec ? familyCompressionOf(spec) : null;
  const plugLimit = familyPlugLimitOf(spec);
  const cylinderSource = (band: string) => (family ? thresholdSourceWords(family.source) : bandSource(band));
  const byPos = new Map<number, number[]>();
  for (const m of ms.filter((x) => x.kind === "compression" && x.value !== null)) {
    byPos.set(m.position, [...(byPos.get(m.position) ?? []), Number(m.value)]);
  }
  const judged = summariseCompression([...byPos].map(([position, attempts]) => ({ position, attempts })), family);
  let compression: Interpretation["compression"] = null;
  if (judged) {
    const { family: _figures, ...summary } = judged;
    compression = {
      ...summary,
      cylinders: summary.cylinders.map((c) => ({ ...c, source: cylinderSource(c.band) })),
      lowest: { ...summary.lowest, source: cylinderSource(summary.lowest.band) },
      spreadSource: sourceOf(spreadBands.find((b) => b.label === summary.spreadBand)?.provenance ?? "common practice, no source"),
      pattern: { ...summary.pattern, source: sourceOf(summary.pattern.provenance) },
    };
  }
  const plugRows = ms.filter((x) => x.kind === "plug_resistance");
  const plugOhms = plugRows.map((p) => (p.over_range ? null : num(p.value)));
  const plugs = plugRows.map((p, i) => {
    const { familyFigure, ...c } = classifyPlug(plugOhms[i], plugOhms.filter((_, j) => j !== i), plugLimit?.healthyMaxOhms ?? null);
    const source = familyFigure && plugLimit ? thresholdSourceWords(plugLimit.source) : sourceOf(c.provenance);
    return { position: p.position, ohms: plugOhms[i], raw: `${p.raw_value}${p.raw_unit ? ` ${p.raw_unit}` : ""}`, ...c, source };
  });
  const rail = ms
    .filter((x) => x.kind === "rail_voltage" && x.value !== null)
    .map((r) => {
      const c = classifyRailVoltage(Number(r.value), hasPreheatCode(faults));
      return { volts: Number(r.value), raw: `${r.raw_value}${r.raw_unit ? ` ${r.raw_unit}` : ""}`, ...c, source: sourceOf(c.provenance) };
    });
  const battery = ms
    .filter((x) => x.kind === "battery_voltage" && x.value !== null)
    .map((r) => ({ volts: Number(r.value), raw: `${r.raw_value}${r.raw_unit ? ` ${r.raw_unit}` : ""}` }));
  return { compression, plugs, rail, battery };
}

/** The warranty policy version a line is judged under: its number, family and coverage per class. */
export interface JudgingPolicy {
  version: number;
  engineFamily: string;
  coverage: PolicyCoverage;
}

/**
 * A line's eligibility under a policy version (registry terms on the machine take precedence); without one,
 * under the version-1 coverage every policy started from.
 */
/** The cover terms and name of a policy version, as eligibility judges a line under it. */
export const judging = (p: PolicyRow) => ({
  version: p.version,
  engineFamily: p.engine_family,
  coverage: { base: { months: p.base_months, hours: p.base_hours }, engine: { months: p.engine_months, hours: p.engine_hours } },
});

export function lineEligibility(l: RepairLineRow, policy: JudgingPolicy | null = null): EligibilityView {
  const cls = coverageClassFor(l);
  const t = termsFor(
    cls,
    {
      warrantyBaseMonths: l.warranty_base_months,
      warrantyBaseHours: l.warranty_base_hours,
      warrantyEngineMonths: l.warranty_engine_months,
      warrantyEngineHours: l.warranty_engine_hours,
    },
    policy?.coverage ?? DEFAULT_TERMS,
  );
  const e = eligibility({ coverageClass: cls, terms: t, deliveryDate: l.delivery_date, failureDate: l.opened_date, hoursAtFailure: num(l.hour_meter) });
  return { ...e, termsFromRegistry: t.fromRegistry, termsSource: termsSourceWords(t.fromRegistry, policy) };
}

/** A repair line as warranty evidence: facts, readings with their interpretation, eligibility, deadline. */
export function toEvidence(
  l: RepairLineRow,
  ms: readonly MeasurementRow[],
  faults: readonly FaultCodeRow[],
  claimDays: number,
  today: string,
  trail: readonly HourReadingRow[] | null = null,
  policy: JudgingPolicy | null = null,
  spec: EngineSpec | null = null,
): RepairLineEvidence {
  const own = ms.filter((m) => m.repair_line_key === l.repair_line_key);
  const roReading = trail?.find((r) => r.repair_line_key === l.repair_line_key);
  const codes = faults.filter((f) => f.repair_line_key === l.repair_line_key);
  return {
    id: String(l.repair_line_key),
    shopCode: l.shop_code,
    roNumber: l.ro_number,
    lineNo: l.line_no,
    openedDate: l.opened_date,
    closedDate: l.closed_date,
    hourMeter: num(l.hour_meter),
    complaint: l.complaint,
    cause: l.cause,
    correction: l.correction,
    laborOp: l.labor_op,
    standardHours: num(l.standard_hours),
    laborHours: num(l.labor_hours),
    partsCost: num(l.parts_cost),
    laborCost: num(l.labor_cost),
    payType: l.pay_type,
    partNumber: l.part_number,
    partDescription: l.part_description,
    partQty: num(l.part_qty),
    supplierLot: l.supplier_lot,
    component: { code: l.component_code, name: l.component_name, system: l.system, assembly: l.assembly },
    machine: {
      serial: l.serial,
      modelCode: l.model_code,
      modelLine: l.model_line,
      engineFamily: l.engine_family,
      engineSerial: l.engine_serial,
      buildDate: l.build_date,
      deliveryDate: l.delivery_date,
      heaterPlugLot: l.heater_plug_lot,
    },
    faultCodes: codes.map((f) => ({ spn: f.spn, fmi: f.fmi, meaning: f.meaning, occurrences: Number(f.occurrences) })),
    measurements: own.map((m) => ({
      kind: m.kind,
      position: m.position,
      attempt: m.attempt,
      value: num(m.value),
      unit: m.unit,
      overRange: m.over_range,
      rawValue: m.raw_value,
      rawUnit: m.raw_unit,
    })),
    interpretation: interpretMeasurements(own, codes, spec),
    eligibility: lineEligibility(l, policy),
    deadline: l.closed_date ? filingDeadline(l.closed_date, claimDays, today) : null,
    hourTrail: trail
      ? trail.map((r) => ({
          date: r.reading_date,
          hours: Number(r.hours),
          source: r.source,
          valid: r.valid,
          invalidReason: r.invalid_reason,
          meterGeneration: r.meter_generation,
          thisRepair: r.repair_line_key === l.repair_line_key,
        }))
      : null,
    hoursAtRisk:
      roReading && !roReading.valid
        ? `The hour-meter cleaning set this repair order's reading aside (${roReading.invalid_reason ?? "no reason recorded"}): the hours at failure may be challenged.`
        : null,
  };
}

export function eligibilityCounts(lines: readonly { eligibility: { verdict: string } }[]) {
  return {
    covered: lines.filter((l) => l.eligibility.verdict === "covered").length,
    notCovered: lines.filter((l) => l.eligibility.verdict === "not_covered").length,
    unknown: lines.filter((l) => l.eligibility.verdict === "unknown").length,
  };
}

/** Parts plus labour on the lines, or null when no line carries a cost. */
export function amountOf(lines: readonly { partsCost: number | null; laborCost: number | null }[]): number | null {
  const costs = lines.flatMap((l) => [l.partsCost, l.laborCost]).filter((x): x is number => x !== null);
  return costs.length ? Math.round(costs.reduce((s, x) => s + x, 0) * 100) / 100 : null;
}

/** The most frequent engine family among the lines (ties: alphabetical). */
export function mainEngineFamily(lines: readonly { machine: { engineFamily: string } }[]): string {
  const n = new Map<string, number>();
  for (const l of lines) n.set(l.machine.engineFamily, (n.get(l.machine.engineFamily) ?? 0) + 1);
  return [...n].sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))[0]?.[0] ?? "*";
}
