/** The block-heater fitting list: which machines at cold shops to fit first, and why. Pure: no I/O. */
import { differenceInMonths, parseISO } from "date-fns";
import { safetyCautionsIn } from "../../../shared/measurement-interpretation.js";
import type { FittingRow } from "../../../shared/schemas/fitting-list.js";
import type { FittingCandidate } from "../../db/queries/fitting-list.js";

/**
 * Machines delivered at most this many months ago are listed first: a block-heater socket left empty rusts and
 * scales, so fitting is quick while it is new and can take hours of cleaning later (common practice, no source).
 */
export const CLEAN_SOCKET_MONTHS = 24;

export const coldRuleText =
  "A shop is cold when at least half of its December–February days on record had a daily minimum below 20 °F (−6.7 °C), " +
  "the temperature below which hard starts begin (common practice, no source). Shops without weather records are not judged cold.";

export const orderRuleText =
  `Machines delivered in the last ${CLEAN_SOCKET_MONTHS} months come first, newest delivery first, so the heater goes in before the empty socket rusts. ` +
  "Older machines follow, the longest-serving cold-start parts first (engine hours since the heater plugs or grid heater were last fitted).";


/** Whole months from `from` to `to` (a month counts once its day of the month is reached; 31 Jan → 28 Feb is 0). */
export function wholeMonths(from: string, to: string): number {
  return Math.max(0, differenceInMonths(parseISO(to), parseISO(from)));
}

/** Engine hours the cold-start parts have run since they were fitted; never below 0 (a meter read low is not negative wear). */
export function partHours(c: Pick<FittingCandidate, "hourMeter" | "partFittedHours">): number | null {
  if (c.hourMeter === null || c.partFittedHours === null) return null;
  return Math.max(0, c.hourMeter - c.partFittedHours);
}

function why(priority: FittingRow["priority"], c: FittingCandidate, months: number): string {
  if (priority === "clean-socket") return `Delivered ${months} ${months === 1 ? "month" : "months"} ago: fit while the socket is still clean.`;
  const replaced = c.partFittedDate !== c.deliveryDate;
  return `Socket unused for over ${CLEAN_SOCKET_MONTHS} months, so allow time to clean it; ${c.partName.toLowerCase()} ${replaced ? "replaced since delivery" : "still the ones fitted at delivery"}.`;
}

/**
 * The fitting list in its order: first the machines delivered at most CLEAN_SOCKET_MONTHS months before `asOf`,
 * newest delivery first; then the rest by engine hours on their cold-start parts, most first (unknown hours last),
 * ties by newer delivery, then serial.
 */
export function fittingList(candidates: readonly FittingCandidate[], asOf: string): FittingRow[] {
  const rows = candidates.map((c): FittingRow => {
    const ageMonths = wholeMonths(c.deliveryDate, asOf);
    const priority = ageMonths <= CLEAN_SOCKET_MONTHS ? "clean-socket" : "old-cold-start-parts";
    return {
      shopCode: c.shopCode,
      shopName: c.shopName,
      serial: c.serial,
      modelLine: c.modelLine,
      engineFamily: c.engineFamily,
      deliveryDate: c.deliveryDate,
      ageMonths,
      hourMeter: c.hourMeter,
      coldStartPartHours: partHours(c),
      coldStartPartFitted: c.partFittedDate,
      coldStartPartName: c.partName,
      priority,
      why: why(priority, c, ageMonths),
    };
  });
  const rank = (r: FittingRow) => (r.priority === "clean-socket" ? 0 : 1);
  return rows.sort(
    (a, b) =>
      rank(a) - rank(b) ||
      (a.priority === "old-cold-start-parts" ? (b.coldStartPartHours ?? -1) - (a.coldStartPartHours ?? -1) : 0) ||
      b.deliveryDate.localeCompare(a.deliveryDate) ||
      a.serial.localeCompare(b.serial),
  );
}

/**
 * The cautions that go with fitting and using a block heater, taken from the product's one list of safety
 * cautions: the block-heater electrical cautions and the deference to the maker's manual, local codes and licensed practice.
 */
export function blockHeaterCautions(): string[] {
  return safetyCautionsIn("C").filter((c) => c.startsWith("Block heaters:") || c.startsWith("These interpretations are decision support"));
}
