/** Calendar arithmetic on whole UTC days (days since 1970-01-01), the demo world's time step. */
import { addMonths as addIsoMonths } from "../../shared/dates.js";

const MS_PER_DAY = 86_400_000;

export function dayOf(iso: string): number {
  return Math.round(Date.parse(`${iso}T00:00:00Z`) / MS_PER_DAY);
}

export function isoOf(day: number): string {
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

/** 1–12 */
export function monthOf(day: number): number {
  return new Date(day * MS_PER_DAY).getUTCMonth() + 1;
}

export function yearOf(day: number): number {
  return new Date(day * MS_PER_DAY).getUTCFullYear();
}

/** Day of the year, 1 on 1 January. */
export function dayOfYear(day: number): number {
  const d = new Date(day * MS_PER_DAY);
  return day - Math.round(Date.UTC(d.getUTCFullYear(), 0, 1) / MS_PER_DAY) + 1;
}

/** The same calendar day `months` later (clamped to the month's end), as warranty terms count months. */
export function addMonths(day: number, months: number): number {
  return dayOf(addIsoMonths(isoOf(day), months));
}

/** December, January and February. */
export function isDjf(day: number): boolean {
  const m = monthOf(day);
  return m === 12 || m <= 2;
}

/** Winter season label for a day in Nov–Mar, e.g. "2022–23"; null outside. */
export function winterOf(day: number): string | null {
  const m = monthOf(day);
  const y = yearOf(day);
  if (m >= 11) return `${y}–${String((y + 1) % 100).padStart(2, "0")}`;
  if (m <= 3) return `${y - 1}–${String(y % 100).padStart(2, "0")}`;
  return null;
}
