/**
 * Benchmark periods: the close months a month, quarter, year, rolling 12 months or "every month to" covers, its
 * key and its words, and the latest month whose comeback window has fully elapsed.
 */
import { addDays, addMonthsToMonth, monthEnd, monthLabel, monthsBetween } from "../../shared/dates.js";
import type { Period } from "../../shared/schemas/benchmarks.js";

export interface ResolvedPeriod {
  period: Period;
  /** the close months of the period, oldest first */
  months: string[];
}

/** The `count` months ending with `last`, oldest first. */
export const monthsEnding = (last: string, count: number): string[] => Array.from({ length: count }, (_, i) => addMonthsToMonth(last, i - count + 1));

/** The month `at` falls back to when not given: the last one, of the kind's unit, that is fully counted. */
function defaultMonth(kind: Period["kind"], lastMonth: string): string {
  const lastMonthNo = Number(lastMonth.slice(5));
  if (kind === "quarter") return addMonthsToMonth(lastMonth, -(lastMonthNo % 3));
  if (kind === "year") return lastMonthNo === 12 ? lastMonth : `${Number(lastMonth.slice(0, 4)) - 1}-12`;
  return lastMonth;
}

/** The months, key and label of a period of `kind` holding month `m`. */
function periodMonths(kind: Period["kind"], m: string, firstMonth: string): { months: string[]; key: string; label: string } {
  const year = m.slice(0, 4);
  if (kind === "month") return { months: [m], key: m, label: monthLabel(m) };
  if (kind === "quarter") {
    const q = Math.floor((Number(m.slice(5)) - 1) / 3) + 1;
    return { months: monthsEnding(`${year}-${String(q * 3).padStart(2, "0")}`, 3), key: `${year}-Q${q}`, label: `Q${q} ${year}` };
  }
  if (kind === "year") return { months: monthsEnding(`${year}-12`, 12), key: year, label: year };
  if (kind === "rolling12") return { months: monthsEnding(m, 12), key: `12m-${m}`, label: `12 months to ${monthLabel(m)}` };
  const months = monthsEnding(m, Math.max(1, monthsBetween(firstMonth, m) + 1));
  return { months, key: `all-${m}`, label: `${monthLabel(months[0]!)} to ${monthLabel(m)}` };
}

/**
 * The months of a period and its words. `at` defaults to the latest period whose comeback window of `days` has
 * fully elapsed: lines closed after asOf − days are still waiting and are not counted.
 */
export function resolvePeriod(kind: Period["kind"], at: string | undefined, asOf: string, firstMonth: string, days: number): ResolvedPeriod {
  const countedThrough = addDays(asOf, -days);
  const countedMonth = countedThrough.slice(0, 7);
  const lastMonth = monthEnd(countedMonth) === countedThrough ? countedMonth : addMonthsToMonth(countedMonth, -1);
  const { months, key, label } = periodMonths(kind, at ?? defaultMonth(kind, lastMonth), firstMonth);
  const to = monthEnd(months[months.length - 1]!);
  return {
    months,
    period: { kind, key, label, from: `${months[0]}-01`, to, asOf, countedThrough, complete: to <= countedThrough, firstMonth, lastMonth },
  };
}
