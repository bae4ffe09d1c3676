/**
 * How complete each month's data is. A machine's exposure runs between its hour readings, so the days after
 * its last reading carry no engine hours while its repair orders still count; a month whose readings stop
 * part-way (the newest months of any export) shows too few hours and too high a rate. Coverage is the share of
 * the month's machine-days in service that hour readings cover:
 *   coverage = exposure machine-days ÷ in-service machine-days,
 * in service meaning from the machine's first hour reading, at its home shop of the day, to the end of the
 * shop's data (or, for a machine not seen for over a year before that, to its last record).
 * A month is complete when coverage is at least COMPLETE_COVERAGE: its rate is then at most about
 * 1 ÷ 0.95 − 1 ≈ 5 % high. (The 95 % threshold is Ironledger's choice, stated on the pages.)
 */
export const COMPLETE_COVERAGE = 0.95;

export interface ShopMonthCoverage {
  shopCode: string;
  /** 'YYYY-MM' */
  month: string;
  exposureDays: number;
  serviceDays: number;
  /** the shop's last hour reading ('YYYY-MM-DD'), the same on each of its rows */
  readingsThrough: string | null;
}

export interface MonthCompleteness {
  month: string;
  exposureDays: number;
  serviceDays: number;
  /** exposure ÷ in-service machine-days; null without machines in service */
  coverage: number | null;
  complete: boolean;
  /** the shops below the threshold that month, with their coverage */
  shortShops: { shopCode: string; coverage: number }[];
}

const ratio = (a: number, b: number) => (b > 0 ? Math.min(1, a / b) : null);

/** Months of the given shops' rows (summed), oldest first; a month is complete when the shops together reach the threshold. */
export function monthCompleteness(rows: readonly ShopMonthCoverage[], threshold = COMPLETE_COVERAGE): MonthCompleteness[] {
  const months = new Map<string, MonthCompleteness>();
  for (const r of rows) {
    const m = months.get(r.month) ?? { month: r.month, exposureDays: 0, serviceDays: 0, coverage: null, complete: false, shortShops: [] };
    m.exposureDays += r.exposureDays;
    m.serviceDays += r.serviceDays;
    const c = ratio(r.exposureDays, r.serviceDays);
    if (c !== null && c < threshold) m.shortShops.push({ shopCode: r.shopCode, coverage: c });
    months.set(r.month, m);
  }
  return [...months.values()]
    .map((m) => {
      const coverage = ratio(m.exposureDays, m.serviceDays);
      return { ...m, coverage, complete: coverage !== null && coverage >= threshold, shortShops: m.shortShops.sort((a, b) => a.shopCode.localeCompare(b.shopCode)) };
    })
    .sort((a, b) => a.month.localeCompare(b.month));
}

/** The newest complete month, or null. */
export function lastCompleteMonth(months: readonly MonthCompleteness[]): string | null {
  for (let i = months.length - 1; i >= 0; i--) if (months[i].complete) return months[i].month;
  return null;
}

/** "hour readings cover 93 % of January 2025's machine-days" for the months left out, in words. */
export function incompleteMonthsWords(months: readonly MonthCompleteness[]): string | null {
  const out = months.filter((m) => !m.complete && m.coverage !== null);
  if (!out.length) return null;
  const pct = (c: number) => `${Math.floor(c * 100)} %`;
  const list = out.map((m) => `${m.month} (${pct(m.coverage!)})`).join(", ");
  return `Left out as incomplete (hour readings cover less than ${Math.round(COMPLETE_COVERAGE * 100)} % of the month's machine-days in service): ${list}.`;
}
