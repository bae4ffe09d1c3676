import type { RateComparison } from "./rate-ratio.js";

/** Two significant figures without exponent notation: 2.4, 0.42, 13. */
export function twoFigures(v: number): string {
  if (v === 0) return "0";
  if (Math.abs(v) >= 10) return Math.round(v).toLocaleString("en-US");
  return v.toPrecision(2);
}

/** p-value as read aloud: "p = 0.004", "p < 0.001". */
export function pWords(p: number): string {
  return p < 0.001 ? "p < 0.001" : `p = ${p.toFixed(3)}`;
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/**
 * A rate comparison in words, e.g. "Lot A fails 2.4 times as often as lot B per 1,000 engine hours (95 % CI
 * 1.3–4.4, p = 0.004)". `labelA`/`labelB` name the groups ("lot A", "all other lots"); `exposure` names the
 * unit ("1,000 engine hours"). Handles no comparison (null), no failures in A and none in B.
 */
export function rateComparisonSentence(labelA: string, labelB: string, c: RateComparison | null, exposure = "1,000 engine hours", noneReason?: string): string {
  if (!c) return noneReason ?? `${capitalise(labelA)} and ${labelB} cannot be compared: one has no ${exposure.replace(/^1,000 /, "")} in these filters, or neither has a failure.`;
  const pct = Math.round(c.level * 100);
  const ci = `${pct} % CI ${twoFigures(c.lower)}–${c.upper === null ? "unbounded" : twoFigures(c.upper)}`;
  if (c.ratio === null) {
    return `${capitalise(labelA)} had ${c.eventsA} failure${c.eventsA === 1 ? "" : "s"} and ${labelB} none, so the ratio per ${exposure} is unbounded (${ci}, ${pWords(c.pValue)}).`;
  }
  if (c.ratio === 0) {
    return `${capitalise(labelA)} had no failures against ${c.eventsB} for ${labelB} (rate ratio 0, ${ci}, ${pWords(c.pValue)}).`;
  }
  return `${capitalise(labelA)} fails ${twoFigures(c.ratio)} times as often as ${labelB} per ${exposure} (${ci}, ${pWords(c.pValue)}).`;
}

/** A B-life in hours as read aloud: "688 h", "2,511 h". */
const hoursWords = (h: number) => `${Math.round(h).toLocaleString("en-US")} h`;

export interface LifeSide {
  /** "lot BT-2109", "the family's other lots" */
  label: string;
  /** B10 from the Weibull fit (engine hours), or null when no fit */
  b10: number | null;
  units: number;
  failures: number;
}

/**
 * A finding's life comparison in words, from two Weibull fits of the part: e.g. "Life: 10 % of heater plugs from
 * lot X have failed by 688 h, against 2,511 h for the family's other lots (B10 of Weibull fits over 410 and 2,300
 * fitted parts)." Null when either side has no fit.
 */
export function lifeComparisonWords(part: string, a: LifeSide, b: LifeSide): string | null {
  if (a.b10 === null || b.b10 === null) return null;
  const shorter = a.b10 < b.b10 ? ` (about ${twoFigures(b.b10 / a.b10)} times shorter)` : "";
  return `Life: 10 % of ${part} from ${a.label} have failed by ${hoursWords(a.b10)}, against ${hoursWords(b.b10)} for ${b.label}${shorter}; B10 of Weibull fits over ${a.units.toLocaleString("en-US")} and ${b.units.toLocaleString("en-US")} fitted parts.`;
}
