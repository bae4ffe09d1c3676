/**
 * Interpretation of diagnostic readings on cold-start repairs, in canonical units (psi, Ω, V).
 * Every threshold carries its provenance: "common practice" = trade rule of thumb with no published
 * source; "from memory" = a value recalled, not checked against a source. These are decision support,
 * not a repair procedure: the maker's service manual for the engine family always wins.
 */
import type { ThresholdSource } from "./threshold-source.js";

export type Provenance = "common practice, no source" | "from memory";

/**
 * An engine family's own compression figures in psi, from the maker's service manual (shared/schemas/engine-specs.ts),
 * and where they come from. They replace the generic compression bands for that family's readings.
 */
export interface FamilyCompression {
  targetMin: number;
  targetMax: number;
  allowableMin: number;
  source: ThresholdSource;
}

const wholePsi = (psi: number) => `${Math.round(psi)} psi`;

/**
 * A compression reading against a family's own figures: good from the target's low end up, watch from the
 * allowable minimum to the target, fault below the allowable minimum. The label names the figure, not its source.
 */
export function familyCompressionBand(psi: number, f: FamilyCompression): { verdict: Verdict; label: string } {
  if (psi >= f.targetMin) return { verdict: "good", label: `${Math.round(f.targetMin)}–${wholePsi(f.targetMax)}: the family's target` };
  if (psi >= f.allowableMin) return { verdict: "watch", label: `under the family's target of ${wholePsi(f.targetMin)}, above its allowable minimum of ${wholePsi(f.allowableMin)}` };
  return { verdict: "fault", label: `below ${wholePsi(f.allowableMin)}: under the family's allowable minimum` };
}

export interface Threshold {
  label: string;
  provenance: Provenance;
}

export const compressionBands: readonly (Threshold & { min: number; max: number | null; verdict: Verdict })[] = [
  { min: 400, max: null, verdict: "good", label: "400–500 psi: target", provenance: "common practice, no source" },
  { min: 350, max: 400, verdict: "good", label: "350–400 psi: still fine", provenance: "common practice, no source" },
  { min: 300, max: 350, verdict: "watch", label: "300–350 psi: marginal, re-test or trend", provenance: "from memory" },
  { min: 290, max: 300, verdict: "fault", label: "below 300 psi: ring or cylinder wear", provenance: "common practice, no source" },
  { min: 0, max: 290, verdict: "fault", label: "below 290 psi: under a typical maker's allowable minimum", provenance: "common practice, no source" },
];

export const spreadBands: readonly (Threshold & { max: number | null; verdict: Verdict })[] = [
  { max: 0.1, verdict: "good", label: "spread ≤ 10 %: even", provenance: "common practice, no source" },
  { max: 0.25, verdict: "watch", label: "spread 10–25 %: investigate", provenance: "common practice, no source" },
  { max: null, verdict: "fault", label: "spread > 25 % (lowest under 75 % of highest): fault", provenance: "common practice, no source" },
];

export type Verdict = "good" | "watch" | "fault";

export interface CylinderReading {
  position: number;
  attempts: number[];
}

export interface CompressionSummary {
  cylinders: { position: number; attempts: number[]; mean: number; verdict: Verdict; band: string }[];
  /** mean of the cylinder means */
  average: number;
  lowest: { position: number; mean: number; verdict: Verdict; band: string };
  highest: { position: number; mean: number };
  /** (max − min) ÷ max of the cylinder means */
  spread: number;
  spreadVerdict: Verdict;
  spreadBand: string;
  pattern: { kind: "even" | "one-low" | "two-adjacent-low" | "all-low" | "scattered"; meaning: string; provenance: Provenance };
  /** the cylinders were judged against the engine family's own figures (familyCompressionBand), not the generic bands */
  family: FamilyCompression | null;
}

const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;

export function compressionBand(psi: number) {
  return compressionBands.find((b) => psi >= b.min && (b.max === null || psi < b.max)) ?? compressionBands[compressionBands.length - 1];
}

/**
 * Compression test summary: each cylinder is the mean of its attempts; the engine is rated by its lowest
 * cylinder, shown beside the average; spread = (max − min) ÷ max. A cylinder counts as low when it is
 * more than 10 % under the highest. Patterns: one low → valves; two adjacent low → head gasket between
 * them; all below 300 psi → rings (common practice, no source). With a family's own figures, each cylinder (and
 * so the lowest) is judged against them instead of the generic bands; spread and pattern stay generic.
 */
export function summariseCompression(readings: readonly CylinderReading[], family: FamilyCompression | null = null): CompressionSummary | null {
  const cyl = readings.filter((r) => r.attempts.length > 0).sort((a, b) => a.position - b.position);
  if (cyl.length === 0) return null;
  const cylinders = cyl.map((c) => {
    const m = mean(c.attempts);
    const b = family ? familyCompressionBand(m, family) : compressionBand(m);
    return { position: c.position, attempts: [...c.attempts], mean: m, verdict: b.verdict, band: b.label };
  });
  const lo = cylinders.reduce((a, b) => (b.mean < a.mean ? b : a));
  const hi = cylinders.reduce((a, b) => (b.mean > a.mean ? b : a));
  const spread = hi.mean > 0 ? (hi.mean - lo.mean) / hi.mean : 0;
  const sb = spreadBands.find((b) => b.max === null || spread <= b.max)!;
  const low = cylinders.filter((c) => c.mean < 0.9 * hi.mean).map((c) => c.position);
  let pattern: CompressionSummary["pattern"];
  if (cylinders.every((c) => c.mean < 300)) pattern = { kind: "all-low", meaning: "all cylinders low: suspect rings / cylinder wear", provenance: "common practice, no source" };
  else if (low.length === 0) pattern = { kind: "even", meaning: "cylinders even", provenance: "common practice, no source" };
  else if (low.length === 1) pattern = { kind: "one-low", meaning: `cylinder ${low[0]} low: suspect a valve`, provenance: "common practice, no source" };
  else if (low.length === 2 && Math.abs(low[0] - low[1]) === 1) pattern = { kind: "two-adjacent-low", meaning: `cylinders ${low[0]} and ${low[1]} low: suspect the head gasket between them`, provenance: "common practice, no source" };
  else pattern = { kind: "scattered", meaning: `cylinders ${low.join(", ")} low: re-test before concluding`, provenance: "common practice, no source" };
  return {
    cylinders,
    average: mean(cylinders.map((c) => c.mean)),
    lowest: { position: lo.position, mean: lo.mean, verdict: lo.verdict, band: lo.band },
    highest: { position: hi.position, mean: hi.mean },
    spread,
    spreadVerdict: sb.verdict,
    spreadBand: sb.label,
    pattern,
    family,
  };
}

export type PlugVerdict = "healthy" | "open" | "short" | "high" | "suspect";

/**
 * Heater-plug resistance, cold and disconnected: 0.5–2 Ω healthy (≈ 1 Ω typical), "OL" or tens of kΩ
 * open, above 10 Ω failed (classifier cut, from memory), 2–10 Ω high, below 0.5 Ω possibly shorted
 * (from memory); a plug well above its siblings (more than 1.5× their median) is suspect. An engine family's own
 * healthy maximum (from the maker's service manual) replaces the 2 Ω line; `familyFigure` is then true on the
 * verdicts it decided (healthy, high).
 */
export function classifyPlug(
  ohms: number | null,
  siblings: readonly (number | null)[] = [],
  familyHealthyMax: number | null = null,
): { verdict: PlugVerdict; label: string; provenance: Provenance; familyFigure?: true } {
  if (ohms === null || ohms > 10) return { verdict: "open", label: ohms === null ? "over range (OL): open circuit, failed" : "above 10 Ω: open, failed", provenance: ohms === null || ohms >= 1000 ? "common practice, no source" : "from memory" };
  if (ohms < 0.5) return { verdict: "short", label: "below 0.5 Ω: possible short", provenance: "from memory" };
  if (familyHealthyMax !== null) {
    if (ohms > familyHealthyMax) return { verdict: "high", label: `above the family's healthy maximum of ${familyHealthyMax} Ω`, provenance: "common practice, no source", familyFigure: true };
  } else if (ohms > 2) return { verdict: "high", label: "2–10 Ω: above the healthy band", provenance: "from memory" };
  const others = siblings.filter((s): s is number => s !== null && s <= 10).sort((a, b) => a - b);
  if (others.length >= 2) {
    const med = others[Math.floor(others.length / 2)];
    if (ohms > 1.5 * med) return { verdict: "suspect", label: "clearly above its sibling plugs: suspect", provenance: "common practice, no source" };
  }
  if (familyHealthyMax !== null) return { verdict: "healthy", label: `0.5–${familyHealthyMax} Ω: healthy (the family's maximum)`, provenance: "common practice, no source", familyFigure: true };
  return { verdict: "healthy", label: "0.5–2 Ω: healthy", provenance: "common practice, no source" };
}

/** Preheat rail voltage, key on, while the plugs are energised. */
export function classifyRailVoltage(volts: number, hasFaultCode: boolean): { verdict: Verdict; label: string; provenance: Provenance } {
  if (volts < 1) return { verdict: "fault", label: hasFaultCode ? "about 0 V with a fault code: suspect the fuse or relay" : "about 0 V: no supply to the rail, check the fuse or relay", provenance: "from memory" };
  if (volts < 10.5) return { verdict: "watch", label: "below 10.5 V: check the battery and cables", provenance: "from memory" };
  return { verdict: "good", label: "about 12 V: the preheat circuit is supplied", provenance: "common practice, no source" };
}

/**
 * The cautions shown wherever Ironledger interprets a reading or suggests work on a machine, with temperatures in
 * the reader's unit (a plug tip of about 1,400–1,500 °F is about 760–815 °C; the conversion of NIST SP 811).
 */
export function safetyCautionsIn(unit: "C" | "F"): readonly string[] {
  const hotTip = unit === "F" ? "about 1,400–1,500 °F" : "about 760–815 °C";
  return [`Hot tips: a heater plug under test reaches ${hotTip}. Clamp it, never lay it hot near rags, fuel or plastic, and test installed plugs only on a cool engine.`, ...otherCautions];
}

const otherCautions: readonly string[] = [
  "Bench tests with a battery can spark: work away from fuel, vapour and charging batteries, with a fused lead and eye protection.",
  "Cranking with the plugs out: disable the injectors and use a remote starter; chock the machine, ground the attachments, keep people clear of the fan, belts and linkages, and respect the starter's duty cycle. Fuel spray from open ports is a fire and injection-injury hazard.",
  "Never use ether or starting spray on engines with glow plugs or an intake grid heater: explosion and fire.",
  "Block heaters: grounded plug, outdoor-rated heavy-gauge cord and a GFCI outlet; inspect the cord and socket, as corrosion in a socket left unused causes arcing; hot coolant when draining, disposed of legally; fixed wiring by a licensed electrician.",
  "These interpretations are decision support, not a repair procedure. Follow the maker's service manual for the engine family, local codes and licensed practice; generic bands may be wrong for a given engine.",
];

/** Where on a bench sheet a caution belongs: beside the field where that work is done. */
export type CautionStep = "rail" | "resistance" | "bench" | "compression" | "cold-start" | "block-heater" | "decision";

const keyOnCaution =
  "Key-on checks: the plugs heat while the rail is energised. Keep hands and loose probes off the plug terminals and the bus bar, and switch the key off before disconnecting any lead.";
const resistanceCaution =
  "Resistance: key off, battery isolated and the plug's lead disconnected before measuring; a plug that was just energised is hot.";

/**
 * The cautions of safetyCautionsIn for one step of the work, each with the deference to the maker's service manual
 * and licensed practice last. The key-on and resistance cautions are the bench sheet's own additions.
 */
export function cautionsAt(step: CautionStep, unit: "C" | "F"): readonly string[] {
  const [hotTips, sparks, cranking, spray, blockHeater, decision] = safetyCautionsIn(unit);
  const by: Record<CautionStep, string[]> = {
    rail: [keyOnCaution],
    resistance: [resistanceCaution, hotTips],
    bench: [hotTips, sparks],
    compression: [cranking],
    "cold-start": [spray],
    "block-heater": [blockHeater],
    decision: [],
  };
  return [...by[step], decision];
}
