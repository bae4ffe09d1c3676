/**
 * The benchmarks' world for one scope and comeback window: the shops, the paired comeback lines and the monthly
 * ledger built from them and the SQL sums. It depends on the warehouse only, so it is cached per data version.
 */
import type { Db } from "../../db/database.js";
import { benchmarkShops, comebackLines, dataSpan, monthlyTotals, partsWaitCounts, technicianNames, type ShopEntry } from "../../db/queries/benchmarks.js";
import { pairComebacks, type ComebackSettings, type OriginalLine } from "../../analytics/comebacks.js";
import { buildLedger, type Ledger } from "../../analytics/benchmark-ledger.js";
import { addDays, todayIso } from "../../../shared/dates.js";
import type { ShopScope } from "../../../shared/schemas/me.js";

export interface World {
  /** the last date with a repair line anywhere in the group (today in an empty warehouse) */
  asOf: string;
  firstMonth: string;
  /** lines closed after this date still have an open comeback window */
  countedThrough: string;
  shops: ShopEntry[];
  originals: OriginalLine[];
  /** shop → month → cell (claims are added per request) */
  ledger: Ledger;
  /** technician display names of the shops in scope */
  techNames: Map<string, string>;
}

export async function loadWorld(db: Db, scope: ShopScope, s: ComebackSettings): Promise<World> {
  const span = await dataSpan(db);
  const asOf = span.asOf ?? todayIso();
  const countedThrough = addDays(asOf, -s.days);
  const [shops, lines, totals, waits, techNames] = await Promise.all([
    benchmarkShops(db, scope),
    comebackLines(db, scope),
    monthlyTotals(db, countedThrough),
    partsWaitCounts(db, countedThrough),
    technicianNames(db, scope),
  ]);
  const originals = pairComebacks(lines, s);
  const ledger = buildLedger(originals, totals, waits, asOf, s);
  return { asOf, firstMonth: span.firstMonth ?? asOf.slice(0, 7), countedThrough, shops, originals, ledger, techNames };
}
