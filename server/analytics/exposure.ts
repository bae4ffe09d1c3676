import { hourBands, type Band } from "../../shared/bands.js";
import { poissonRate, type RateEstimate } from "./poisson.js";

/*
 * Band definitions (hour bands, daily-minimum temperature bands and the [lo, hi) lookup `bandOf`) live in
 * shared/bands.ts so that warehouse aggregates, these computations and the charts use the same ids and edges.
 */

/** Engine hours in one band, keyed by the band id of shared/bands.ts. */
export interface BandExposure {
  band: string;
  hours: number;
}

/**
 * Engine hours a machine spent in each band while observed: |[entryHours, exitHours] ∩ [lo, hi)|, in engine hours.
 * entryHours = hours at delivery or at the start of the data window (delayed entry); exitHours = last valid
 * reading. Hours outside every band are not counted. Returns one row per band (default: the DOMAIN.md hour
 * bands of shared/bands.ts), zero rows included.
 */
export function hoursInBands(entryHours: number, exitHours: number, bands: readonly Band[] = hourBands): BandExposure[] {
  if (!(exitHours >= entryHours)) throw new RangeError(`exit hours ${exitHours} before entry hours ${entryHours}`);
  return bands.map((b) => ({
    band: b.id,
    hours: Math.max(0, Math.min(exitHours, b.hi ?? Infinity) - Math.max(entryHours, b.lo ?? -Infinity)),
  }));
}

/** Σ over machines of {@link hoursInBands}: the fleet's engine-hour exposure per band. */
export function exposureByHourBand(
  machines: readonly { entryHours: number; exitHours: number }[],
  bands: readonly Band[] = hourBands,
): BandExposure[] {
  const totals = bands.map((b) => ({ band: b.id, hours: 0 }));
  for (const m of machines) {
    hoursInBands(m.entryHours, m.exitHours, bands).forEach((row, i) => (totals[i].hours += row.hours));
  }
  return totals;
}

/**
 * Tmin used to label a failure day. With `morningRule` (DOMAIN.md option) it is min(Tmin of the day, Tmin of the
 * day before), because a cold-start complaint comes from a morning start; without it, the day's own Tmin.
 */
export function failureDayTmin(tminDay: number, tminDayBefore: number | null, morningRule: boolean): number {
  return morningRule && tminDayBefore !== null ? Math.min(tminDay, tminDayBefore) : tminDay;
}

/** Failures and exposure in one band (exposure in engine hours or machine-days). */
export interface BandCount {
  band: string;
  failures: number;
  exposure: number;
}

export interface BandRate extends BandCount {
  /** Rate per `per` units of exposure with exact Poisson limits; null where there is no exposure. */
  rate: RateEstimate | null;
}

/**
 * Rate table: per band, rate = per × failures ÷ exposure with exact (Garwood) Poisson limits, e.g. per = 1000
 * for "failures per 1,000 engine hours" or "per 1,000 machine-days". Bands without exposure get rate null.
 */
export function bandRates(rows: readonly BandCount[], per = 1000, level = 0.95): BandRate[] {
  return rows.map((row) => ({ ...row, rate: poissonRate(row.failures, row.exposure, per, level) }));
}

/**
 * Expected failures in a cell by indirect standardisation: E = Σ_band exposure_cell(band) × F_ref(band)/X_ref(band),
 * where F_ref, X_ref are the reference group's failures and exposure in that band (rate per unit of exposure,
 * not per 1,000). Bands the cell has no exposure in contribute nothing; a band where the cell has exposure but
 * the reference has none throws, because the reference must contain the cell.
 */
export function expectedFailures(cellExposure: Readonly<Record<string, number>>, reference: readonly BandCount[]): number {
  const byBand = new Map(reference.map((r) => [r.band, r]));
  let expected = 0;
  for (const [band, exposure] of Object.entries(cellExposure)) {
    if (exposure <= 0) continue;
    const ref = byBand.get(band);
    if (!ref || !(ref.exposure > 0)) throw new RangeError(`reference has no exposure in band ${band}`);
    expected += (exposure * ref.failures) / ref.exposure;
  }
  return expected;
}

export interface HourMeterReading {
  /** ISO date "YYYY-MM-DD" (a time part, if present, only orders same-day readings). */
  date: string;
  /** Meter value as read. */
  hours: number;
  /** The note says the meter (or cluster) was replaced at this reading: it is the new meter's first value. */
  meterChanged?: boolean;
  /** With a meter change: the old meter's final value, if recorded. */
  oldMeterFinalHours?: number;
  source?: string;
}

export type ReadingStatus = "valid" | "small-backwards" | "backwards" | "too-fast" | "future-date" | "unreadable";

export interface CleanedReading extends HourMeterReading {
  status: ReadingStatus;
  valid: boolean;
  /** 0 for the original meter, +1 at each meter change. */
  generation: number;
  /** Added to the meter value to give machine hours. */
  offset: number;
  /** offset + hours for valid readings (clamped for small backward moves); null when invalid. */
  machineHours: number | null;
}

export interface HourMeterRules {
  /** Backward moves up to this many hours are tolerated (reading noise); default 2 (DOMAIN.md). */
  maxBackwardsHours?: number;
  /** Largest plausible rise per calendar day; default 24 h. */
  maxHoursPerDay?: number;
  /** ISO date; readings dated after it are invalid ("future-date"). */
  asOf?: string;
}

const DAY_MS = 86_400_000;

/** Whole days since 1970-01-01 of the date part of an ISO date or date-time. */
export function dayNumber(isoDate: string): number {
  const match = /^(\d{4})-(\d{2})-(\d{2})/.exec(isoDate);
  if (!match) throw new RangeError(`not an ISO date: ${isoDate}`);
  return Date.UTC(Number(match[1]), Number(match[2]) - 1, Number(match[3])) / DAY_MS;
}

/**
 * Cleans one machine's hour-meter trail (DOMAIN.md "Hour-meter cleaning"), in one forward pass against the last
 * valid reading after sorting by date (stable: same-day readings keep their input order):
 *
 * - non-finite or negative values → "unreadable"; dated after `asOf` → "future-date";
 * - a reading marked `meterChanged` starts a new generation: offset = previous offset + oldMeterFinalHours when
 *   the old meter's final value is known (new meter assumed to start at 0), otherwise chosen so that machine
 *   hours continue from the last valid reading;
 * - otherwise a fall of more than `maxBackwardsHours` (2 h) → "backwards"; a smaller fall is kept as
 *   "small-backwards" with machine hours held at the previous value, so the trail never decreases;
 * - a rise of more than `maxHoursPerDay` (24 h) × calendar days between the readings (at least 1) → "too-fast".
 *
 * Limitation: the first readable reading is trusted; if it is itself wrong, later good readings are rejected.
 */
export function cleanHourMeter(readings: readonly HourMeterReading[], rules: HourMeterRules = {}): CleanedReading[] {
  const maxBack = rules.maxBackwardsHours ?? 2;
  const maxPerDay = rules.maxHoursPerDay ?? 24;
  const asOfDay = rules.asOf === undefined ? Infinity : dayNumber(rules.asOf);
  const sorted = readings.map((r, i) => ({ r, i })).sort((a, b) => (a.r.date < b.r.date ? -1 : a.r.date > b.r.date ? 1 : a.i - b.i));
  let generation = 0;
  let offset = 0;
  let last: { day: number; machineHours: number } | null = null;
  return sorted.map(({ r }) => {
    const day = dayNumber(r.date);
    const reject = (status: ReadingStatus): CleanedReading => ({ ...r, status, valid: false, generation, offset, machineHours: null });
    if (!Number.isFinite(r.hours) || r.hours < 0) return reject("unreadable");
    if (day > asOfDay) return reject("future-date");
    if (r.meterChanged && last !== null) {
      generation++;
      offset = r.oldMeterFinalHours === undefined ? last.machineHours - r.hours : offset + r.oldMeterFinalHours;
    }
    let machineHours = offset + r.hours;
    let status: ReadingStatus = "valid";
    if (last !== null && !r.meterChanged) {
      const rise = machineHours - last.machineHours;
      if (rise < -maxBack) return reject("backwards");
      if (rise > maxPerDay * Math.max(1, day - last.day)) return reject("too-fast");
      if (rise < 0) {
        status = "small-backwards";
        machineHours = last.machineHours;
      }
    }
    last = { day, machineHours };
    return { ...r, status, valid: true, generation, offset, machineHours };
  });
}

export interface HoursEstimate {
  hours: number;
  /** "extrapolated" values are flagged: they mark a claim or exposure "at risk". */
  method: "reading" | "interpolated" | "extrapolated";
}

/**
 * Machine hours on a date from a cleaned trail: the valid reading of that day (the last one, if several), else
 * linear interpolation in calendar days between the valid readings either side. After the last valid reading
 * it extrapolates at the trail's average rate (first to last valid reading) for at most `maxExtrapolationDays`
 * (default 90, DOMAIN.md), flagged "extrapolated". Before the first valid reading, beyond the limit, or with
 * too few readings to give a rate, returns null.
 */
export function hoursAtDate(
  trail: readonly CleanedReading[],
  date: string,
  maxExtrapolationDays = 90,
): HoursEstimate | null {
  const points: { day: number; hours: number }[] = [];
  for (const r of trail) {
    if (!r.valid || r.machineHours === null) continue;
    const day = dayNumber(r.date);
    if (points.length > 0 && points[points.length - 1].day === day) points[points.length - 1].hours = r.machineHours;
    else points.push({ day, hours: r.machineHours });
  }
  if (points.length === 0) return null;
  const day = dayNumber(date);
  const first = points[0];
  const lastPoint = points[points.length - 1];
  if (day < first.day) return null;
  if (day > lastPoint.day) {
    if (day - lastPoint.day > maxExtrapolationDays || lastPoint.day === first.day) return null;
    const rate = (lastPoint.hours - first.hours) / (lastPoint.day - first.day);
    return { hours: lastPoint.hours + rate * (day - lastPoint.day), method: "extrapolated" };
  }
  const after = points.findIndex((p) => p.day >= day);
  const hi = points[after];
  if (hi.day === day) return { hours: hi.hours, method: "reading" };
  const lo = points[after - 1];
  return { hours: lo.hours + ((hi.hours - lo.hours) * (day - lo.day)) / (hi.day - lo.day), method: "interpolated" };
}

/** Machine hours at the last valid reading (H_exit of the exposure computation), or null if none is valid. */
export function lastValidHours(trail: readonly CleanedReading[]): number | null {
  for (let i = trail.length - 1; i >= 0; i--) {
    if (trail[i].valid) return trail[i].machineHours;
  }
  return null;
}
