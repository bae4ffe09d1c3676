/** Calendar arithmetic on ISO dates ('YYYY-MM-DD'), in UTC so no time zone shifts a day. */

const parse = (d: string): Date => {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(d)) throw new Error(`not an ISO date: ${d}`);
  return new Date(`${d}T00:00:00Z`);
};
const format = (t: Date): string => t.toISOString().slice(0, 10);

export function addDays(date: string, days: number): string {
  const t = parse(date);
  t.setUTCDate(t.getUTCDate() + days);
  return format(t);
}

/** date + n calendar months; a day past the end of the target month falls back to its last day (Jan 31 + 1 month = Feb 28/29). */
export function addMonths(date: string, months: number): string {
  const t = parse(date);
  const y = t.getUTCFullYear();
  const m = t.getUTCMonth() + months;
  const lastDay = new Date(Date.UTC(y, m + 1, 0)).getUTCDate();
  return format(new Date(Date.UTC(y, m, Math.min(t.getUTCDate(), lastDay))));
}

/** Whole calendar days from a to b (positive when b is later). */
export function daysBetween(a: string, b: string): number {
  return Math.round((parse(b).getTime() - parse(a).getTime()) / 86_400_000);
}

export const todayIso = (now: Date = new Date()): string => format(now);

export const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString("en-US")} ${Math.abs(n) === 1 ? one : many}`;
