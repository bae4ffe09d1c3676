/**
 * What a technician's bench sheet points to: each value interpreted as typed, and the sheet summed up in words
 * (what the readings point to, what they rule out, what to do next). Pure, so the page interprets on the phone
 * with the same rules the tests pin. The bands are those of shared/measurement-interpretation.ts: decision
 * support, not a repair procedure; the maker's service manual for the engine family always wins.
 */
import type { BenchCylinder, BenchPlug, BenchPressureUnit, BenchResistance, BenchSheet, BenchTemperatureUnit, BenchTestResult } from "./schemas/bench-sheet.js";
import {
  classifyPlug,
  classifyRailVoltage,
  compressionBand,
  familyCompressionBand,
  summariseCompression,
  type CompressionSummary,
  type PlugVerdict,
  type Provenance,
  type Verdict,
} from "./measurement-interpretation.js";
import { KPA_PER_PSI, toKpa } from "./format.js";
import { celsiusToFahrenheit } from "./bands.js";
import { generalSource, thresholdSourceWords, type ThresholdSource } from "./threshold-source.js";
import { familyCompressionOf, familyPlugLimitOf, type EngineSpec } from "./schemas/engine-specs.js";

/** NIST SP 811 (2008), Table 5: the SI prefix kilo is 10³, so 1 kΩ = 1,000 Ω. */
export const OHMS_PER_KILOHM = 1000;

/** A meter reading in ohms: a number in Ω or kΩ; `null` for OL (open circuit); `undefined` when nothing was entered. */
export function resistanceOhms(r: BenchResistance | null): number | null | undefined {
  if (r === null) return undefined;
  if (r.unit === "OL") return null;
  return r.unit === "kohm" ? r.value * OHMS_PER_KILOHM : r.value;
}

/** A gauge reading in psi, through kPa with the factors of NIST SP 811 (2008) Appendix B.8 (shared/format.ts). */
export const pressurePsi = (value: number, unit: BenchPressureUnit): number => toKpa(value, unit) / KPA_PER_PSI;

/** An ambient temperature in °F (the cold-start bands are written in °F; °F = °C × 9/5 + 32, NIST SP 811 B.8). */
export const ambientF = (a: { value: number; unit: BenchTemperatureUnit }): number => (a.unit === "F" ? a.value : celsiusToFahrenheit(a.value));

/** A hard cold start is expected below about 20 °F (−7 °C): common practice, no source. */
export const COLD_SHOP_F = 20;

/** The compression an engine family should show, in psi, and where the figures come from. */
export interface CompressionLimits {
  targetMin: number;
  targetMax: number;
  allowableMin: number;
  source: ThresholdSource;
}

/**
 * Generic limits for this class of engine: about 400–500 psi healthy, about 290 psi an allowable minimum
 * (common practice, no source). A family's own figures replace them where the maker's manual gives them.
 */
export const GENERAL_COMPRESSION_LIMITS: CompressionLimits = {
  targetMin: 400,
  targetMax: 500,
  allowableMin: 290,
  source: generalSource("common practice, no source"),
};

/**
 * What the parts desk knows of the plug: its part number, how long it usually takes from order to receipt (the
 * median, and the 90th percentile, in days) and whether it is back-ordered at the shop now.
 */
export interface PartsOutlook {
  partNumber?: string | null;
  typicalWaitDays: number | null;
  p90WaitDays?: number | null;
  backOrderedNow: boolean | null;
  /** the order lines the wait figures were taken over */
  lines?: number;
}

export interface PlugResult {
  position: number;
  /** ohms; null for OL; undefined when no resistance was entered */
  ohms: number | null | undefined;
  verdict: PlugVerdict | null;
  label: string | null;
  provenance: Provenance | null;
  bench: BenchTestResult;
  benchWords: string;
  /** open on the meter or no heat on the bench */
  failed: boolean;
  /** the meter and the bench disagree */
  conflict: string | null;
  /** the verdict was decided by the engine family's own healthy maximum (its source is in the label) */
  familyFigure: boolean;
}

const benchWords: Record<BenchTestResult, string> = {
  heats: "heats on the bench (draws current, tip glows red): plug good",
  no_heat: "no heat on the bench: plug failed",
  not_tested: "not bench-tested",
};

/**
 * Each plug's meter reading against its siblings (classifyPlug), with its bench test beside it; against the
 * family's healthy maximum (and its source named in the label) where the family has one.
 */
export function interpretPlugs(plugs: readonly BenchPlug[], family: { healthyMaxOhms: number; source: ThresholdSource } | null = null): PlugResult[] {
  const ohms = plugs.map((p) => resistanceOhms(p.resistance));
  return plugs.map((p, i) => {
    const o = ohms[i];
    const siblings = ohms.filter((_, j) => j !== i).filter((s): s is number | null => s !== undefined);
    const c = o === undefined ? null : classifyPlug(o, siblings, family?.healthyMaxOhms ?? null);
    const open = c?.verdict === "open";
    let conflict: string | null = null;
    if (open && p.bench === "heats") conflict = "reads open but heats on the bench: measure again with the lead disconnected and clean contacts";
    else if (c?.verdict === "healthy" && p.bench === "no_heat") conflict = "reads healthy but does not heat: check the bench lead and clamp; a plug that does not heat has failed";
    return {
      position: p.position,
      ohms: o,
      verdict: c?.verdict ?? null,
      label: c ? (c.familyFigure && family ? `${c.label} (${thresholdSourceWords(family.source)})` : c.label) : null,
      provenance: c?.provenance ?? null,
      bench: p.bench,
      benchWords: benchWords[p.bench],
      failed: open || p.bench === "no_heat",
      conflict,
      familyFigure: !!(c?.familyFigure && family),
    };
  });
}

export interface CylinderResult {
  position: number;
  /** attempts in psi, first first */
  attempts: number[];
  mean: number;
  lowestAttempt: number;
  /** (highest − lowest attempt) ÷ highest attempt: how well the attempts agree */
  attemptSpread: number;
  verdict: Verdict;
  band: string;
  provenance: Provenance;
}

export interface CompressionResult {
  cylinders: CylinderResult[];
  average: number;
  lowest: { position: number; mean: number; verdict: Verdict };
  spread: number;
  spreadVerdict: Verdict;
  spreadBand: string;
  pattern: CompressionSummary["pattern"];
  /** cylinders whose mean is under the allowable minimum */
  belowAllowable: number[];
  /** every cylinder at or above its verdict "good" and the cylinders even */
  healthy: boolean;
  limits: CompressionLimits;
}

/** A cylinder's mean against the limits: the generic bands as the repair detail shows them, or the family's own figures. */
function cylinderVerdict(psi: number, limits: CompressionLimits): { verdict: Verdict; band: string; provenance: Provenance } {
  if (limits.source.kind === "general") {
    const b = compressionBand(psi);
    return { verdict: b.verdict, band: b.label, provenance: b.provenance };
  }
  // the family's own figures are the maker's; the tag names only how Ironledger holds its generic bands
  const b = familyCompressionBand(psi, limits);
  return { verdict: b.verdict, band: `${b.label} (${thresholdSourceWords(limits.source)})`, provenance: "common practice, no source" };
}

/**
 * Compression per cylinder over its attempts (mean, lowest attempt, spread of the attempts) and for the engine
 * (average, lowest cylinder, spread and pattern, from summariseCompression), with readings converted to psi.
 */
export function interpretCompression(c: { unit: BenchPressureUnit; cylinders: readonly BenchCylinder[] }, limits: CompressionLimits = GENERAL_COMPRESSION_LIMITS): CompressionResult | null {
  const inPsi = c.cylinders.map((cyl) => ({ position: cyl.position, attempts: cyl.attempts.filter(Number.isFinite).map((a) => pressurePsi(a, c.unit)) }));
  const s = summariseCompression(inPsi);
  if (!s) return null;
  const cylinders = s.cylinders.map((cyl) => {
    const lo = Math.min(...cyl.attempts);
    const hi = Math.max(...cyl.attempts);
    return { position: cyl.position, attempts: cyl.attempts, mean: cyl.mean, lowestAttempt: lo, attemptSpread: hi > 0 ? (hi - lo) / hi : 0, ...cylinderVerdict(cyl.mean, limits) };
  });
  const lowest = cylinders.find((x) => x.position === s.lowest.position)!;
  return {
    cylinders,
    average: s.average,
    lowest: { position: lowest.position, mean: lowest.mean, verdict: lowest.verdict },
    spread: s.spread,
    spreadVerdict: s.spreadVerdict,
    spreadBand: s.spreadBand,
    pattern: s.pattern,
    belowAllowable: cylinders.filter((x) => x.mean < limits.allowableMin).map((x) => x.position),
    healthy: cylinders.every((x) => x.verdict === "good") && s.spreadVerdict === "good",
    limits,
  };
}

export interface RailResult {
  volts: number;
  verdict: Verdict;
  label: string;
  provenance: Provenance;
  lamp: string | null;
}

/** The rail voltage (classifyRailVoltage) with what the wait-to-start lamp says beside it. */
export function interpretRail(volts: number | null, preheatLamp: boolean | null): RailResult | null {
  if (volts === null || !Number.isFinite(volts)) return null;
  const c = classifyRailVoltage(volts, false);
  const lamp =
    preheatLamp === null
      ? null
      : preheatLamp
        ? "the wait-to-start lamp lit: the control asked for preheat"
        : "the wait-to-start lamp stayed dark: the control did not ask for preheat (a warm engine, or the control, its sensor or the lamp)";
  return { volts, ...c, lamp };
}

export interface Statement {
  text: string;
  provenance: Provenance;
}

export interface BenchSummary {
  plugs: PlugResult[];
  compression: CompressionResult | null;
  rail: RailResult | null;
  /** the ambient in °F when entered, and whether it is below the cold-start line */
  coldShop: boolean | null;
  /** what the readings point to, most urgent first */
  pointsTo: Statement[];
  /** what they rule out */
  rulesOut: Statement[];
  /** next steps as decision support */
  nextSteps: Statement[];
}

export interface SummaryOptions {
  limits?: CompressionLimits;
  /** the engine family's healthy maximum plug resistance (Ω) from the maker's manual, and its source */
  plugLimit?: { healthyMaxOhms: number; source: ThresholdSource } | null;
  /** the plug's availability; null or left out when the parts desk has no figure */
  parts?: PartsOutlook | null;
  /** a pressure in psi in the reader's unit (default "N psi") */
  pressure?: (psi: number) => string;
}

/** The summary's options for an engine family's own figures (its compression limits and plug maximum), or the generic bands. */
export function familyOptions(spec: EngineSpec | null): Pick<SummaryOptions, "limits" | "plugLimit"> {
  return spec ? { limits: familyCompressionOf(spec), plugLimit: familyPlugLimitOf(spec) } : { limits: GENERAL_COMPRESSION_LIMITS, plugLimit: null };
}

const NUMBER_WORDS = ["no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten", "eleven", "twelve"];
const count = (n: number) => NUMBER_WORDS[n] ?? String(n);
const list = (xs: readonly number[]) => (xs.length < 2 ? xs.join("") : `${xs.slice(0, -1).join(", ")} and ${xs[xs.length - 1]}`);
const plural = (n: number, one: string, many: string) => (n === 1 ? one : many);
const COMMON: Provenance = "common practice, no source";

/** The whole sheet interpreted and summed up in words. */
export function summariseBenchSheet(sheet: BenchSheet, o: SummaryOptions = {}): BenchSummary {
  const limits = o.limits ?? GENERAL_COMPRESSION_LIMITS;
  const psi = o.pressure ?? ((p: number) => `${Math.round(p)} psi`);
  const plugs = interpretPlugs(sheet.plugs, o.plugLimit ?? null);
  const compression = interpretCompression(sheet.compression, limits);
  const rail = interpretRail(sheet.railVoltage, sheet.preheatLamp);
  const coldShop = sheet.conditions.ambient === null ? null : ambientF(sheet.conditions.ambient) < COLD_SHOP_F;
  const pointsTo: Statement[] = [];
  const rulesOut: Statement[] = [];
  const nextSteps: Statement[] = [];

  const judged = plugs.filter((p) => p.verdict !== null || p.bench !== "not_tested");
  const failed = judged.filter((p) => p.failed);
  const allFailed = judged.length > 0 && failed.length === judged.length;
  const allOpenOnMeter = allFailed && failed.every((p) => p.verdict === "open");
  const odd = judged.filter((p) => !p.failed && p.verdict !== null && p.verdict !== "healthy");
  const compressionLow = compression !== null && !compression.healthy;

  if (rail?.verdict === "fault") {
    pointsTo.push({ text: `The rail reads ${rail.volts < 0.05 ? "0" : rail.volts.toFixed(1)} V: check the fuse and relay before the plugs.`, provenance: rail.provenance });
    nextSteps.push({ text: "Check the preheat fuse and relay (and the control's fault codes), then measure the rail again with the key on.", provenance: rail.provenance });
  } else if (rail?.verdict === "watch") {
    pointsTo.push({ text: `The rail reads ${rail.volts.toFixed(1)} V, under 10.5 V: check the battery and cables before judging the plugs.`, provenance: rail.provenance });
    nextSteps.push({ text: "Charge or load-test the battery and check the cables, then measure the rail again.", provenance: rail.provenance });
  }

  if (compression && compressionLow) {
    const p = compression.pattern;
    const lo = compression.lowest;
    if (p.kind === "one-low") {
      // summariseCompression's rule: a cylinder is low when more than 10 % under the highest
      const top = Math.max(...compression.cylinders.map((c) => c.mean));
      const cyl = compression.cylinders.find((c) => c.mean < 0.9 * top)?.position ?? lo.position;
      pointsTo.push({ text: `Compression low on cylinder ${cyl}: look at the valve before blaming the plugs.`, provenance: p.provenance });
    } else if (p.kind === "two-adjacent-low") {
      pointsTo.push({ text: `Compression low on two neighbouring cylinders: ${p.meaning}; look at the gasket before blaming the plugs.`, provenance: p.provenance });
    } else if (p.kind === "all-low") {
      pointsTo.push({ text: "Compression low on every cylinder: suspect rings and cylinder wear; new plugs alone will not cure the hard cold start.", provenance: p.provenance });
    } else if (p.kind === "scattered") {
      pointsTo.push({ text: `Compression uneven: ${p.meaning}.`, provenance: p.provenance });
    } else {
      pointsTo.push({ text: `Compression is even but the lowest cylinder (${lo.position}) reads ${psi(lo.mean)}, under the healthy ${psi(limits.targetMin)}–${psi(limits.targetMax)}: re-test, then trend it.`, provenance: COMMON });
    }
    if (compression.belowAllowable.length) {
      pointsTo.push({
        text: `${plural(compression.belowAllowable.length, "Cylinder", "Cylinders")} ${list(compression.belowAllowable)} ${plural(compression.belowAllowable.length, "is", "are")} under the allowable minimum of ${psi(limits.allowableMin)} (${thresholdSourceWords(limits.source)}).`,
        provenance: COMMON,
      });
    }
    nextSteps.push({ text: "Re-test compression (all plugs out, injectors disabled, several attempts per cylinder) and compare with the maker's figure for the engine family before any engine work.", provenance: COMMON });
  }

  if (failed.length) {
    const n = judged.length;
    const what = allOpenOnMeter ? "open" : "failed";
    const head = allFailed
      ? `${n === 1 ? "The" : n === 2 ? "Both" : `All ${count(n)}`} ${plural(n, "plug", "plugs")} ${what}`
      : `${plural(failed.length, "Plug", "Plugs")} ${list(failed.map((p) => p.position))} ${what} (${failed.length} of ${n})`;
    if (compression?.healthy && rail?.verdict !== "fault") {
      pointsTo.push({ text: `${head}, compression healthy: the plugs, not the engine, explain the hard cold start.`, provenance: COMMON });
    } else if (compressionLow) {
      pointsTo.push({ text: `${head}: replace ${plural(failed.length, "it", "them")}, but with low compression the plugs alone may not explain the hard start.`, provenance: COMMON });
    } else if (rail?.verdict === "fault") {
      pointsTo.push({ text: `${head}: replace ${plural(failed.length, "it", "them")} once the rail is supplied again; a dead rail alone also stops preheat.`, provenance: COMMON });
    } else {
      pointsTo.push({ text: `${head}: the plugs explain a hard cold start; compression is not measured yet, so the engine is not ruled out.`, provenance: COMMON });
    }
    nextSteps.push({ text: `Replace ${plural(failed.length, `plug ${failed[0].position}`, `plugs ${list(failed.map((p) => p.position))}`)}.`, provenance: COMMON });
    nextSteps.push(...partsSteps(o.parts ?? null, coldShop));
  }
  for (const p of odd) pointsTo.push({ text: `Plug ${p.position}: ${p.label}; bench-test it before deciding.`, provenance: p.provenance ?? COMMON });
  for (const p of plugs) if (p.conflict) pointsTo.push({ text: `Plug ${p.position} ${p.conflict}.`, provenance: COMMON });

  if (compression?.healthy) rulesOut.push({ text: "Compression is healthy and even on every cylinder: worn rings, a valve or the head gasket do not explain the hard start.", provenance: COMMON });
  if (rail?.verdict === "good") rulesOut.push({ text: "The rail is supplied (about 12 V): the fuse, relay and feed to the plugs are not the cause.", provenance: rail.provenance });
  if (judged.length > 0 && failed.length === 0 && odd.length === 0) rulesOut.push({ text: `Every plug measured reads healthy: the plugs are not the cause.`, provenance: COMMON });

  if (pointsTo.length === 0 && rulesOut.length > 0 && compression?.healthy && rail?.verdict === "good" && judged.length > 0) {
    pointsTo.push({ text: "Plugs, rail and compression read healthy: the preheat and the engine's compression do not explain a hard cold start; look further (battery and cranking speed, fuel).", provenance: COMMON });
  }
  return { plugs, compression, rail, coldShop, pointsTo, rulesOut, nextSteps };
}

/** The plug's availability in words and, when it must wait in a cold shop, the block heater as the interim. */
function partsSteps(parts: PartsOutlook | null, coldShop: boolean | null): Statement[] {
  const steps: Statement[] = [];
  const known = parts !== null && (parts.typicalWaitDays !== null || parts.backOrderedNow !== null);
  if (!known) {
    steps.push({ text: "Ask the parts desk whether the plugs are in stock: Ironledger holds no availability figure for this line.", provenance: COMMON });
  } else {
    const days = (n: number) => `${n} ${n === 1 ? "day" : "days"}`;
    const typical = parts.typicalWaitDays === null ? null : Math.round(parts.typicalWaitDays);
    const p90 = parts.p90WaitDays === null || parts.p90WaitDays === undefined ? null : Math.round(parts.p90WaitDays);
    const wait =
      typical !== null
        ? `typically ${days(typical)} from order to receipt${p90 !== null && p90 > typical ? ` (9 orders in 10 within ${days(p90)})` : ""}`
        : parts.lines !== undefined
          ? `too few orders in the last 12 months to say how long they take (only ${parts.lines})`
          : "";
    const interim = coldShop ? " — consider the interim option below" : "";
    const back = parts.backOrderedNow === null ? "" : parts.backOrderedNow ? `back-ordered at your shop now${interim}` : "not back-ordered at your shop now";
    steps.push({ text: `Heater plugs${parts.partNumber ? ` ${parts.partNumber}` : ""}: ${[wait, back].filter(Boolean).join("; ")}.`, provenance: COMMON });
  }
  const waiting = known ? parts.backOrderedNow === true || (parts.typicalWaitDays ?? 0) >= 1 : null;
  if (coldShop && waiting !== false) {
    steps.push({
      text: `${waiting ? "While the plugs are on their way" : "If the plugs must wait"}, a block heater keeps the engine startable in the cold: clean the socket first (corrosion in an unused socket causes arcing), then a grounded plug, an outdoor-rated heavy-gauge cord and a GFCI outlet.`,
      provenance: COMMON,
    });
  }
  return steps;
}
