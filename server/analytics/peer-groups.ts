/**
 * How a caller who may not name the other shops of the group (a shop manager) sees them: never one shop's
 * figure, only how the other shops spread, figure by figure, in groups of at least three.
 *
 * The rule, per figure (comeback rate, labour efficiency, parts wait, …):
 * 1. Each other shop's figure is rounded to a coarse step (half or whole percent, whole days, ten lines).
 * 2. The shops with a figure are sorted and cut into at most three groups of at least MIN_PEERS shops each,
 *    only where the rounded figure changes, as near to equal thirds (or halves) as that allows. With fewer
 *    than 2 × MIN_PEERS shops there is one group and no figure at all, only how many shops it holds.
 * 3. A group is given by its shop count and the cut points around it ("3 below 4 %", "4 at 4 % or more"),
 *    each cut halfway between the two shops either side of it, on the step. The lowest and highest figures
 *    are never given, so an extreme shop is only "in the top group".
 *
 * Why a shop cannot be picked out: no answer holds a per-shop record (no letter, row, point or series), so
 * there is nothing to follow from one period to the next and no combination of figures that belongs to one
 * shop; each figure is spread on its own, so an unusual value on one figure does not lead to that shop's other
 * figures; every shown range holds at least three shops, so knowing one shop's exact figure (its unusual parts
 * wait, say) narrows it to a group of three or more, never to itself; and a cut point depends only on the two
 * shops either side of it, each with at least two more shops beyond it, so an outlier never moves it. Differencing
 * does not help either: the spreads are not sums, so subtracting two periods, two comeback windows or two period
 * kinds gives a difference of unlabelled middles, not one shop's figure. The group totals stay exact: they sum
 * every shop, so with seven other shops their difference from the caller's own is a sum of seven; with only one
 * or two other shops that difference would be theirs, so then no group figure is given (groupFigureShown below).
 */

import type { PeerGroup, PeerSpread, PeerSummary, ShopBenchmark } from "../../shared/schemas/benchmarks.js";

/** The fewest shops any shown group may hold. */
export const MIN_PEERS = 3;
/** At most this many groups per figure (thirds). */
const MAX_GROUPS = 3;

/** x rounded to a multiple of step (half away from zero), without binary noise. */
export function roundTo(x: number, step: number): number {
  const k = Math.round(Math.abs(x) / step) * Math.sign(x);
  return Number((k * step).toPrecision(12));
}

/**
 * The cut indices (each the first index of a new group) into the sorted rounded figures: every group at least
 * `min` long, cuts only where the figure changes, as near to equal parts as that allows, most groups first.
 */
export function cutIndices(rounded: readonly number[], min = MIN_PEERS, maxGroups = MAX_GROUPS): number[] {
  const n = rounded.length;
  const valid = (j: number) => rounded[j - 1]! < rounded[j]!;
  for (let g = Math.min(maxGroups, Math.floor(n / min)); g >= 2; g--) {
    let best: { cuts: number[]; cost: number } | null = null;
    const search = (from: number, left: number, cuts: number[]) => {
      if (left === 0) {
        if (n - from < min) return;
        const cost = cuts.reduce((s, c, k) => s + Math.abs(c - ((k + 1) * n) / g), 0);
        if (!best || cost < best.cost) best = { cuts: [...cuts], cost };
        return;
      }
      for (let j = from + min; j <= n - min * left; j++) if (valid(j)) search(j, left - 1, [...cuts, j]);
    };
    search(0, g - 1, []);
    if (best) return (best as { cuts: number[] }).cuts;
  }
  return [];
}

/**
 * How the other shops spread on one figure (null: the shop has no such figure), by the rule above.
 * `unit` writes a cut point ("4 %", "12 d").
 */
export function peerSpread(values: readonly (number | null)[], step: number, unit: (x: number) => string): PeerSpread {
  const rounded = values.filter((v): v is number => v !== null && Number.isFinite(v)).map((v) => roundTo(v, step)).sort((a, b) => a - b);
  const n = rounded.length;
  if (n < MIN_PEERS) {
    return { shops: n, step, groups: [], words: `fewer than ${MIN_PEERS} other shops have this figure: not shown` };
  }
  const cuts = cutIndices(rounded);
  if (cuts.length === 0) {
    return { shops: n, step, groups: [{ shops: n, from: null, to: null }], words: `${n} other shops: too few or too close together to split into groups of ${MIN_PEERS}` };
  }
  const bounds = [0, ...cuts, n];
  // a cut sits halfway between the two shops either side of it, on the step: above the lower one, at most the upper one
  const units = (x: number) => Math.round(x / step);
  const cutAt = (j: number) => roundTo(Math.ceil((units(rounded[j - 1]!) + units(rounded[j]!)) / 2) * step, step);
  const groups: PeerGroup[] = bounds.slice(0, -1).map((start, k) => ({
    shops: bounds[k + 1]! - start,
    from: k === 0 ? null : cutAt(start),
    to: k === bounds.length - 2 ? null : cutAt(bounds[k + 1]!),
  }));
  const words = groups
    .map((g) => (g.from === null ? `${g.shops} below ${unit(g.to!)}` : g.to === null ? `${g.shops} at ${unit(g.from)} or more` : `${g.shops} from ${unit(g.from)} to under ${unit(g.to)}`))
    .join(" · ");
  return { shops: n, step, groups, words };
}

const halfPct = (x: number): string => `${Number((100 * x).toFixed(1))} %`;
const wholeDays = (x: number): string => `${Math.round(x)} d`;
const lines = (x: number): string => `${x.toLocaleString("en-US")} lines`;

/** The rule in words, for the page. */
export const PEER_RULE =
  `Other shops are never shown one by one. For each figure they are rounded (comeback and back-order rates to half a percent, other shares to whole percent, waits to whole days, volumes to ten lines), sorted and split into at most three groups of at least ${MIN_PEERS} shops; ` +
  `a group is given only by how many shops it holds and where it starts and ends ("3 below 4 %", "4 at 4 % or more"). The lowest and highest figures are never given: ` +
  `an unusual shop only shows as being in the top or bottom group. With fewer than ${2 * MIN_PEERS} other shops there is one group and no figure; with fewer than ${MIN_PEERS}, nothing. ` +
  `No letter, row or point stands for one shop, so nothing can be followed from one period or filter to the next. The group figures are exact sums over every shop, given only while at least ${MIN_PEERS} other shops hold data in the period (with fewer, your own shops would be most of the total and the rest could be read off it).`;

/** The figures of the other shops' rows (exact, as a group-wide caller gets them) as spreads. */
export function peerSummary(rows: readonly ShopBenchmark[]): PeerSummary {
  return {
    shops: rows.length,
    rule: PEER_RULE,
    lines: peerSpread(rows.map((r) => r.lines), 10, lines),
    comeback: peerSpread(rows.map((r) => r.comeback.value), 0.005, halfPct),
    efficiency: peerSpread(rows.map((r) => r.efficiency.value), 0.01, halfPct),
    partsWaitMedian: peerSpread(rows.map((r) => r.partsWait.median), 1, wholeDays),
    partsWaitP90: peerSpread(rows.map((r) => r.partsWait.p90), 1, wholeDays),
    backOrder: peerSpread(rows.map((r) => r.backOrder.value), 0.005, halfPct),
    coldStartMeasured: peerSpread(rows.map((r) => r.coldStartMeasured.value), 0.01, halfPct),
    warrantyOnTime: peerSpread(rows.map((r) => r.warrantyOnTime.value), 0.01, halfPct),
  };
}

/** A shop as one caller sees it: by code and name, or as one of the other shops (never sent out one by one). */
export interface ShownShop {
  code: string;
  name: string;
  /** the shop code; "other" for a shop the caller may not name */
  key: string;
  /** "S1 Name"; "Other shop" for a shop the caller may not name */
  label: string;
  peer: boolean;
}

/** Shops in the order a caller sees them: the shops in scope by code, then the others. */
export function shownShops(shops: readonly { code: string; name: string; inScope: boolean }[]): ShownShop[] {
  const shown = shops.map((s): ShownShop => (s.inScope ? { code: s.code, name: s.name, key: s.code, label: `${s.code} ${s.name}`, peer: false } : { code: s.code, name: s.name, key: "other", label: "Other shop", peer: true }));
  return shown.sort((a, b) => (a.peer !== b.peer ? (a.peer ? 1 : -1) : a.code < b.code ? -1 : 1));
}

/** What a caller reads where a group figure is withheld. */
export const GROUP_HIDDEN = "The group figure is hidden: fewer than three other shops to compare with.";

/**
 * Whether a caller may see the group's totals and rates (and what is drawn from them: the group rate, the funnel
 * limits around it, the group's series). A group total sums the caller's own shops and the others, so a caller
 * limited to some shops can subtract its own and read the rest: with one or two other shops holding data, the
 * rest is one shop's figure, or two shops' of which the caller may know one. The group figure is therefore given
 * to a group-wide caller always, and to a caller limited to some shops only when at least MIN_PEERS other shops
 * hold data in the period (the threshold rule of statistical disclosure control; Hundepool et al., Statistical
 * Disclosure Control, Wiley 2012; k = 3 from memory).
 */
export function groupFigureShown(groupWide: boolean, otherShopsWithData: number): boolean {
  return groupWide || otherShopsWithData >= MIN_PEERS;
}
