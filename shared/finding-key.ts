import { temperatureBandOrdinal } from "./bands.js";

/** The dimensions a finding's lead fixes (as the scan and the API write them: "all" = not fixed). */
export interface FindingDimensions {
  component?: string;
  engineFamily: string;
  build: "all" | { from: string; to: string };
  supplierLot: string;
  shop: string;
  temperatureBand: string;
  hourBand: string;
}
const ALL = "all";

/**
 * The key a finding is known by from load to load, so its status, owner and notes stay with it while its
 * figures move. A lot finding is its part and lot (a lot is the signal, whichever build window or family the
 * scan describes it by as the data grow); any other finding is its part and the dimensions its lead fixes,
 * the build window by its first month only (a window that grows by a month is still the same finding).
 *
 * A temperature band is keyed by its position in its unit's set, coldest = 1 ("temp=2"), not by its id: the
 * scan runs in the unit the user reads in, and the °C and °F sets both have five bands, cold to warm, so the
 * finding "second-coldest days at shop S1" keeps its status, owner and notes whichever unit it is looked at
 * in (the °C band −20 to −10 °C and the °F band 0 to 20 °F are not the same days, but they are the same
 * question). Days without weather keep their id ("temp=unknown").
 */
export function findingKey(d: FindingDimensions): string {
  const part = d.component ?? ALL;
  if (d.supplierLot !== ALL) return `part=${part};lot=${d.supplierLot}`;
  const fixed: string[] = [`part=${part}`];
  if (d.engineFamily !== ALL) fixed.push(`family=${d.engineFamily}`);
  if (d.build !== ALL) fixed.push(`built-from=${d.build.from}`);
  if (d.shop !== ALL) fixed.push(`shop=${d.shop}`);
  if (d.temperatureBand !== ALL) fixed.push(`temp=${temperatureBandOrdinal(d.temperatureBand) ?? d.temperatureBand}`);
  if (d.hourBand !== ALL) fixed.push(`hours=${d.hourBand}`);
  return fixed.join(";");
}

export type FindingTrend = "new" | "stronger" | "weaker" | "unchanged";

/**
 * How the last load that changed a finding's figures moved it: stronger when the evidence of an excess grew
 * (the exact lower ratio limit rose by more than 5 % of itself, or failures were added while the limit held),
 * weaker when that limit fell by more than 5 %; new when there is no earlier figure. The 5 % keeps a load's
 * rounding-sized changes from being news (common practice, no source).
 */
export function findingTrend(prev: { observed: number; lower: number } | null, now: { observed: number; lower: number }): FindingTrend {
  if (!prev) return "new";
  if (now.lower > prev.lower * 1.05 || (now.observed > prev.observed && now.lower >= prev.lower * 0.95)) return "stronger";
  if (now.lower < prev.lower * 0.95) return "weaker";
  return "unchanged";
}
