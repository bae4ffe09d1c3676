/** One unit's time-to-event record, shared by the Weibull and Kaplan–Meier modules. */
export interface LifeObservation {
  /** Age at failure or at censoring (> 0), in the analysis unit (engine hours since install). */
  time: number;
  /** 1 = failed at `time`, 0 = right-censored (still working at its last valid reading). */
  event: 0 | 1;
  /** Age when the unit came under observation (delayed entry / left truncation); default 0, must be < time. */
  entry?: number;
}

/** Throws RangeError unless every row has time > 0, event 0 or 1, and 0 ≤ entry < time. */
export function validateLifeData(observations: readonly LifeObservation[]): void {
  for (const o of observations) {
    const entry = o.entry ?? 0;
    if (!(o.time > 0) || !Number.isFinite(o.time)) throw new RangeError(`time must be a positive number, got ${o.time}`);
    if (o.event !== 0 && o.event !== 1) throw new RangeError(`event must be 0 or 1, got ${String(o.event)}`);
    if (!(entry >= 0) || entry >= o.time) throw new RangeError(`entry must satisfy 0 ≤ entry < time, got ${entry} ≥ ${o.time}`);
  }
}
