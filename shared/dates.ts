import { addDays as fnsAddDays, addMonths as fnsAddMonths, format, parseISO } from "date-fns";

/**
 * Calendar arithmetic on ISO dates ('YYYY-MM-DD') and months ('YYYY-MM'), the one place for it.
 * date-fns works in local time; a calendar date parsed at local midnight and formatted back never shifts a
 * day, and its calendar-day difference ignores daylight-saving hours.
 */

const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;
const ISO_MONTH = /^\d{4}-\d{2}$/;

function parseDate(date: string): Date {
  if (!ISO_DATE.test(date)) throw new Error(`not an ISO date: ${date}`);
  return parseISO(date);
}
const formatDate = (d: Date): string => format(d, "yyyy-MM-dd");

export function addDays(date: string, days: number): string {
  return formatDate(fnsAddDays(parseDate(date), days));
}

/** date + n calendar months; a day past the end of the target month falls back to its last day (Jan 31 + 1 month = Feb 28/29). */
export function addMonths(date: string, months: number): string {
  return formatDate(fnsAddMonths(parseDate(date), months));
}

/**
 * Whole calendar days from a to b (positive when b is later). Date.parse reads an ISO date as UTC midnight,
 * so the difference is a whole number of days; it is in hot loops (comebacks), where date-fns is ~7× slower.
 */
export function daysBetween(a: string, b: string): number {
  if (!ISO_DATE.test(a)) throw new Error(`not an ISO date: ${a}`);
  if (!ISO_DATE.test(b)) throw new Error(`not an ISO date: ${b}`);
  return Math.round((Date.parse(b) - Date.parse(a)) / 86_400_000);
}

/** Today's date in UTC. */
export const todayIso = (now: Date = new Date()): string => now.toISOString().slice(0, 10);

function parseMonth(month: string): Date {
  if (!ISO_MONTH.test(month)) throw new Error(`not an ISO month: ${month}`);
  return parseISO(`${month}-01`);
}

/** 'YYYY-MM' shifted by n months. */
export function addMonthsToMonth(month: string, n: number): string {
  return format(fnsAddMonths(parseMonth(month), n), "yyyy-MM");
}

/** The last day of a month ('YYYY-MM' → 'YYYY-MM-DD'). */
export function monthEnd(month: string): string {
  return formatDate(fnsAddDays(fnsAddMonths(parseMonth(month), 1), -1));
}

/** Months since year 0 (for counting months between two 'YYYY-MM'). */
export function monthIndex(month: string): number {
  const d = parseMonth(month);
  return d.getFullYear() * 12 + d.getMonth();
}

/** Whole months from a to b ('YYYY-MM', positive when b is later). */
export const monthsBetween = (a: string, b: string): number => monthIndex(b) - monthIndex(a);

/** A month in English words ('2024-02' → 'February 2024'). */
export const monthLabel = (month: string): string => format(parseMonth(month), "MMMM yyyy");
