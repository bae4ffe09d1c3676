/**
 * Comebacks: a repair that has to be done again. Pure pairing over plain repair-line records, no I/O.
 *
 * Rule (DOMAIN.md §3 "Comeback", common practice, no source): a later failure line on the same machine and the
 * same system that begins within N days (default 30, setting 7–90) and H engine hours (default 100, setting
 * 50–200) of the original line's close, both limits. Excluded: planned return-for-parts visits, PM lines,
 * installs and customer damage, which are not a repair done again. A comeback is attributed to the original
 * line's shop and technician, and is not itself an original: it neither enters the denominator nor spawns
 * comebacks of its own (a third visit is a repeat repair).
 */
import { daysBetween } from "../../shared/dates.js";

export type LineType = "failure" | "pm" | "return_for_parts" | "install";

export interface RepairLineRecord {
  id: string;
  shop: string;
  technician: string | null;
  machine: string;
  /** the component's system (Engine, Electrical, …): pairing is at system level, coding differs between shops */
  system: string;
  lineType: LineType;
  /** the failure mode is customer damage */
  customerDamage: boolean;
  /** ISO dates, YYYY-MM-DD */
  opened: string;
  closed: string | null;
  /** hour meter at the line's opening, engine hours; null when not recorded */
  hourMeter: number | null;
}

export interface ComebackSettings {
  days: number;
  hours: number;
}

export const DEFAULT_COMEBACK_SETTINGS: ComebackSettings = { days: 30, hours: 100 };
export const COMEBACK_LIMITS = { days: { min: 7, max: 90 }, hours: { min: 50, max: 200 } } as const;

export interface ComebackPair {
  original: RepairLineRecord;
  followUp: RepairLineRecord;
  /** calendar days from the original's close to the follow-up's opening */
  daysAfterClose: number;
  /** engine hours from the original's close to the follow-up's opening; null when a meter reading is missing or ran backwards */
  hoursAfterClose: number | null;
}

export interface OriginalLine {
  line: RepairLineRecord;
  comebacks: ComebackPair[];
}


/** Lines that can be the original of a comeback: closed failure lines that are not customer damage. */
export function isRepair(l: RepairLineRecord): boolean {
  return l.lineType === "failure" && !l.customerDamage;
}

/**
 * Engine hours between the original's close and the follow-up's opening. Exports record the meter when a line
 * opens, not when it closes, so the reading at close is interpolated linearly by date between the two lines'
 * readings: hours = (h_f − h_o) × (d_f − c_o) / (d_f − d_o). Null when either reading is missing or the meter
 * went backwards (a replaced meter): the day limit alone then decides.
 */
export function hoursAfterClose(original: RepairLineRecord, followUp: RepairLineRecord): number | null {
  if (original.hourMeter === null || followUp.hourMeter === null || original.closed === null) return null;
  const run = followUp.hourMeter - original.hourMeter;
  if (run < 0) return null;
  const span = daysBetween(original.opened, followUp.opened);
  if (span <= 0) return run;
  return (run * daysBetween(original.closed, followUp.opened)) / span;
}

/** The pair when `followUp` is a comeback of `original` under the settings, otherwise null. */
export function comebackPair(original: RepairLineRecord, followUp: RepairLineRecord, s: ComebackSettings): ComebackPair | null {
  if (!isRepair(original) || !isRepair(followUp) || original.closed === null || original.id === followUp.id) return null;
  if (original.machine !== followUp.machine || original.system !== followUp.system) return null;
  const days = daysBetween(original.closed, followUp.opened);
  if (days < 0 || days > s.days) return null;
  const hours = hoursAfterClose(original, followUp);
  if (hours !== null && hours > s.hours) return null;
  return { original, followUp, daysAfterClose: days, hoursAfterClose: hours };
}

export function assertSettings(s: ComebackSettings): void {
  const { days, hours } = COMEBACK_LIMITS;
  if (!(s.days >= days.min && s.days <= days.max)) throw new RangeError(`comeback days must be ${days.min}–${days.max}, got ${s.days}`);
  if (!(s.hours >= hours.min && s.hours <= hours.max)) throw new RangeError(`comeback hours must be ${hours.min}–${hours.max}, got ${s.hours}`);
}

/**
 * Splits repair lines into originals, each with the comebacks that followed it. Lines are taken per machine and
 * system in order of opening; a line that is a comeback of any earlier line is not an original.
 * Non-repair lines (PM, return for parts, installs, customer damage) are ignored.
 */
export function pairComebacks(lines: readonly RepairLineRecord[], s: ComebackSettings = DEFAULT_COMEBACK_SETTINGS): OriginalLine[] {
  assertSettings(s);
  const groups = new Map<string, RepairLineRecord[]>();
  for (const l of lines) {
    if (!isRepair(l)) continue;
    const k = `${l.machine}|${l.system}`;
    const g = groups.get(k);
    if (g) g.push(l);
    else groups.set(k, [l]);
  }
  const out: OriginalLine[] = [];
  for (const g of groups.values()) {
    g.sort((a, b) => (a.opened < b.opened ? -1 : a.opened > b.opened ? 1 : a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
    const isComeback = new Array<boolean>(g.length).fill(false);
    const pairsOf: ComebackPair[][] = g.map(() => []);
    for (let j = 0; j < g.length; j++) {
      for (let i = 0; i < j; i++) {
        const pair = comebackPair(g[i]!, g[j]!, s);
        if (!pair) continue;
        isComeback[j] = true;
        if (!isComeback[i]) pairsOf[i]!.push(pair);
      }
    }
    for (let i = 0; i < g.length; i++) if (!isComeback[i] && g[i]!.closed !== null) out.push({ line: g[i]!, comebacks: pairsOf[i]! });
  }
  return out;
}

/** The original's comeback window has fully elapsed by `asOf` (last date with data): close + N days ≤ asOf. */
export function windowElapsed(line: RepairLineRecord, asOf: string, s: ComebackSettings): boolean {
  return line.closed !== null && daysBetween(line.closed, asOf) >= s.days;
}

export interface ComebackCount {
  /** qualifying originals: repair lines, not themselves comebacks, whose window has fully elapsed */
  lines: number;
  /** of those, lines with at least one comeback */
  withComeback: number;
}

/** Comeback rate numerator and denominator: lines with ≥ 1 comeback ÷ qualifying repair lines. */
export function countComebacks(originals: readonly OriginalLine[], asOf: string, s: ComebackSettings): ComebackCount {
  let lines = 0;
  let withComeback = 0;
  for (const o of originals) {
    if (!windowElapsed(o.line, asOf, s)) continue;
    lines++;
    if (o.comebacks.length > 0) withComeback++;
  }
  return { lines, withComeback };
}
