import type { Db } from "../db/database.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import type { Headline, Overview } from "../../shared/schemas/overview.js";
import { analyticsFiltersSchema } from "../../shared/schemas/analytics-filters.js";
import { countsByMonth } from "../db/queries/analytics-rates.js";
import { lastExposureMonth, latestLoads, machinesNeedingAttention, type AttentionRow, type LoadRow } from "../db/queries/overview.js";
import { poissonRate } from "../analytics/poisson.js";
import { addMonthsToMonth } from "../../shared/dates.js";
import { COLD_START_AIDS } from "./cluster-finder.js";
import { shopMonthCoverage } from "../db/queries/month-coverage.js";
import { COMPLETE_COVERAGE, lastCompleteMonth, monthCompleteness, type MonthCompleteness } from "../analytics/month-completeness.js";

const HEADLINES: { label: string; components: string[] }[] = [
  { label: "All failures", components: [] },
  { label: "Cold-start aids", components: COLD_START_AIDS },
  { label: "Heater-plug set", components: ["ENG-CSA-HPLUG"] },
];

async function headlines(db: Db, scope: ShopScope): Promise<Overview["headlines"]> {
  const method = `Failures (first visit for a fault; comebacks excluded) per 1,000 engine hours over the twelve months ending with the last complete month, against the twelve months before; exact Poisson 95 % limits. A month is complete when hour readings cover at least ${Math.round(COMPLETE_COVERAGE * 100)} % of its machine-days in service: after a machine's last reading its hours are unknown while its repairs still count, so newer months would read too high.`;
  const [lastData, coverage] = await Promise.all([lastExposureMonth(db, scope), shopMonthCoverage(db, scope)]);
  const months = monthCompleteness(coverage);
  const last = lastCompleteMonth(months);
  if (!lastData || !last) return { thisYear: null, lastYear: null, rows: [], method, note: lastData ? "No month of your shops' data is complete yet, so no year can be compared." : null };
  const thisYear = { from: addMonthsToMonth(last, -11), to: last };
  const lastYear = { from: addMonthsToMonth(last, -23), to: addMonthsToMonth(last, -12) };
  const rows = await Promise.all(
    HEADLINES.map(async (h): Promise<Headline> => {
      const f = analyticsFiltersSchema.parse({ from: `${lastYear.from}-01`, components: h.components.join(",") });
      const months = await countsByMonth(db, scope, f);
      const sum = (from: string, to: string) => {
        const inside = months.filter((r) => r.band.slice(0, 7) >= from && r.band.slice(0, 7) <= to);
        const failures = inside.reduce((s, r) => s + r.failures, 0);
        const engineHours = inside.reduce((s, r) => s + r.engineHours, 0);
        const rate = poissonRate(failures, engineHours);
        return { failures, engineHours, rate: rate ? { rate: rate.rate, lower: rate.lower, upper: rate.upper, per: rate.per, level: rate.level } : null };
      };
      const a = sum(thisYear.from, thisYear.to);
      const b = sum(lastYear.from, lastYear.to);
      return { label: h.label, components: h.components, thisYear: a, lastYear: b, change: a.rate && b.rate && b.rate.rate > 0 ? a.rate.rate / b.rate.rate : null };
    }),
  );
  return { thisYear, lastYear, rows, method, note: windowNote(months, thisYear, lastYear, lastData) };
}

const monthWords = (m: string) => new Date(`${m}-01T00:00:00Z`).toLocaleDateString("en-GB", { month: "long", year: "numeric", timeZone: "UTC" });

/** Which twelve-month windows the headline compares, and which newer or inner months it leaves out, in words. */
function windowNote(months: MonthCompleteness[], thisYear: { from: string; to: string }, lastYear: { from: string; to: string }, lastData: string): string {
  const parts = [`Compares ${monthWords(thisYear.from)} – ${monthWords(thisYear.to)} with ${monthWords(lastYear.from)} – ${monthWords(lastYear.to)}.`];
  const after = months.filter((m) => m.month > thisYear.to && m.month <= lastData);
  if (after.length) {
    const pct = (m: MonthCompleteness) => `${Math.floor((m.coverage ?? 0) * 100)} %`;
    parts.push(`${after.length === 1 ? "The newest month" : `The newest ${after.length} months`} (${after.map((m) => `${monthWords(m.month)} ${pct(m)}`).join(", ")}) are left out: hour readings do not yet cover enough of their machine-days.`);
  }
  const holes = months.filter((m) => m.month >= lastYear.from && m.month <= thisYear.to && !m.complete);
  if (holes.length) parts.push(`Incomplete months inside the windows: ${holes.map((m) => monthWords(m.month)).join(", ")}.`);
  return parts.join(" ");
}

export interface OverviewSummary {
  loads: LoadRow[];
  headlines: Overview["headlines"];
  attention: { windowEnd: string | null; rows: AttentionRow[] };
}

/**
 * The part of the Overview that depends on the warehouse and the caller's shops only: the latest load of
 * each kind per shop, this year's and last year's headline rates, and the machines most in need of
 * attention. The route keeps it per scope until the next load; shop names, clusters and the caller's
 * visit are read per request.
 */
export async function overviewSummary(db: Db, scope: ShopScope): Promise<OverviewSummary> {
  const [loads, head, attention] = await Promise.all([latestLoads(db, scope), headlines(db, scope), machinesNeedingAttention(db, scope)]);
  return { loads, headlines: head, attention };
}
