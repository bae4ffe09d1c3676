import { benjaminiHochberg } from "./fdr.js";
import { poissonExactInterval, poissonExcessPValue, type StandardisedRatio } from "./poisson.js";
import { monthIndex } from "../../shared/dates.js";

/** Marks a dimension that a cell does not restrict. */
export const ALL = "all";
export type All = typeof ALL;

/** Build months, inclusive, as "YYYY-MM". */
export interface MonthRange {
  from: string;
  to: string;
}

/** Where a cell sits in the cube; ALL on a dimension means "every value". */
export interface CellDimensions {
  /**
   * The part whose failures the cell counts (a component code), when the scan runs part by part; absent or
   * ALL when it counts the scanned components together (the system level).
   */
  component?: string | All;
  engineFamily: string | All;
  build: MonthRange | All;
  supplierLot: string | All;
  shop: string | All;
  temperatureBand: string | All;
  hourBand: string | All;
}

/** A cell of the cluster finder's input: failures observed and expected (already standardised). */
export interface ScanCell {
  dimensions: CellDimensions;
  observed: number;
  expected: number;
  repairLineIds: readonly string[];
}

export interface ScannedCell extends ScanCell {
  /** O/E with exact Poisson limits. */
  ratio: StandardisedRatio;
  /** One-sided exact P(X ≥ O | E). */
  pValue: number;
  /** Benjamini–Hochberg q over all tested cells. */
  qValue: number;
}

export interface ClusterSignal extends ScannedCell {
  rank: number;
  description: string;
  /** Significant cells merged into this one by the containment rules. */
  absorbed: CellDimensions[];
}

export type DropReason = "no-extra-signal" | "explained-by-contained-cell";

export interface DroppedCell {
  cell: ScannedCell;
  reason: DropReason;
  /** The cell that made this one redundant. */
  by: CellDimensions;
}

export interface ClusterScanResult {
  /** Every cell with expected > 0, with ratio, p and q. */
  tested: ScannedCell[];
  /** Cells with nothing expected: no ratio exists, so they are neither tested nor counted in the BH m. */
  untested: ScanCell[];
  /** Kept signals, ranked. */
  signals: ClusterSignal[];
  /** Significant cells removed by the containment rules. */
  dropped: DroppedCell[];
  qThreshold: number;
  level: number;
}

/** Display names for coded dimension values (shop codes, band ids); identity when absent. */
export interface DimensionLabels {
  /** the part's name for a component code, starting the sentence in place of the subject */
  component?: (code: string) => string;
  shop?: (code: string) => string;
  temperatureBand?: (id: string) => string;
  hourBand?: (id: string) => string;
}

export interface ClusterScanOptions {
  /** What failed, starting the sentence, e.g. "Heater-plug set". */
  subject: string;
  /** Keep cells with q strictly below this; default 0.05. */
  qThreshold?: number;
  /**
   * A cell needs at least this many failures to be reported, however small its expectation; default 3. One or
   * two failures in a very narrow cell (a lot at one shop in one temperature and hour band) can pass the
   * false-discovery control on an expectation of 0.01 yet are no place to look (common practice, no source).
   */
  minObserved?: number;
  /** Level of the ratio intervals (and of the remainder test in the merge rule); default 0.95. */
  level?: number;
  labels?: DimensionLabels;
}

const SCALAR_DIMENSIONS = ["component", "engineFamily", "supplierLot", "shop", "temperatureBand", "hourBand"] as const;
type ScalarDimension = (typeof SCALAR_DIMENSIONS)[number];

/** A scalar dimension's value; a cell without a component is at the system level, i.e. ALL parts. */
const valueOf = (d: CellDimensions, k: ScalarDimension): string => d[k] ?? ALL;

function sameDimensions(a: CellDimensions, b: CellDimensions): boolean {
  if (SCALAR_DIMENSIONS.some((d) => valueOf(a, d) !== valueOf(b, d))) return false;
  if (a.build === ALL || b.build === ALL) return a.build === b.build;
  return a.build.from === b.build.from && a.build.to === b.build.to;
}

/**
 * True when `broad` covers `specific` and is not the same cell: on every dimension broad is ALL or equal to
 * specific's value, and broad's build window (ALL = every month) includes specific's.
 */
export function containsCell(broad: CellDimensions, specific: CellDimensions): boolean {
  if (sameDimensions(broad, specific)) return false;
  for (const d of SCALAR_DIMENSIONS) {
    if (valueOf(broad, d) !== ALL && valueOf(broad, d) !== valueOf(specific, d)) return false;
  }
  if (broad.build === ALL) return true;
  if (specific.build === ALL) return false;
  return monthIndex(broad.build.from) <= monthIndex(specific.build.from) && monthIndex(specific.build.to) <= monthIndex(broad.build.to);
}

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];

/** "Sep 2021", "Sep–Dec 2021" or "Nov 2021–Feb 2022". */
export function formatBuildWindow(range: MonthRange): string {
  const [fromYear, fromMonth] = range.from.split("-");
  const [toYear, toMonth] = range.to.split("-");
  const from = MONTHS[Number(fromMonth) - 1];
  const to = MONTHS[Number(toMonth) - 1];
  if (range.from === range.to) return `${from} ${fromYear}`;
  if (fromYear === toYear) return `${from}–${to} ${toYear}`;
  return `${from} ${fromYear}–${to} ${toYear}`;
}

const expectedText = (e: number): string => (e >= 1 ? e.toFixed(1) : e.toFixed(2));

/**
 * One plain sentence for a cell, e.g. "Heater-plug set on engine family K26-4R built Sep–Dec 2021, lot BT-2109:
 * 41 failures where 9.6 were expected (ratio 4.3, 95 % CI 3.1–5.8)". Dimensions set to ALL are left out;
 * expected counts show 1 decimal (2 below 1), ratios and limits 1 decimal.
 */
export function describeCell(cell: ScannedCell, subject: string, labels: DimensionLabels = {}): string {
  const d = cell.dimensions;
  const head: string[] = [];
  if (d.engineFamily !== ALL) head.push(`on engine family ${d.engineFamily}`);
  if (d.build !== ALL) head.push(`built ${formatBuildWindow(d.build)}`);
  const tail: string[] = [];
  if (d.supplierLot !== ALL) tail.push(`lot ${d.supplierLot}`);
  if (d.shop !== ALL) tail.push(`at shop ${labels.shop?.(d.shop) ?? d.shop}`);
  if (d.temperatureBand !== ALL) tail.push(`daily minimum ${labels.temperatureBand?.(d.temperatureBand) ?? d.temperatureBand}`);
  if (d.hourBand !== ALL) tail.push(`at ${labels.hourBand?.(d.hourBand) ?? d.hourBand}`);
  const where = [head.join(" "), ...tail].filter((s) => s.length > 0).join(", ");
  if (d.component !== undefined && d.component !== ALL) subject = labels.component?.(d.component) ?? d.component;
  const r = cell.ratio;
  const failures = cell.observed === 1 ? "1 failure" : `${cell.observed} failures`;
  const verb = cell.expected === 1 ? "was" : "were";
  const level = `${Math.round(r.level * 1000) / 10} %`;
  return (
    `${subject}${where ? ` ${where}` : ", all machines"}: ${failures} where ${expectedText(cell.expected)} ${verb} expected ` +
    `(ratio ${r.ratio.toFixed(1)}, ${level} CI ${r.lower.toFixed(1)}–${r.upper.toFixed(1)})`
  );
}

function validateCell(cell: ScanCell): void {
  if (!Number.isInteger(cell.observed) || cell.observed < 0) throw new RangeError(`observed must be a count, got ${cell.observed}`);
  if (!(cell.expected >= 0)) throw new RangeError(`expected must be ≥ 0, got ${cell.expected}`);
}

/** True when the part of `broad` outside `specific` shows no excess: its exact lower ratio limit is ≤ 1. */
function remainderHasExcess(
  broad: ScannedCell,
  specific: ScannedCell,
  ratioOf: (observed: number, expected: number) => StandardisedRatio,
): boolean | null {
  const observed = broad.observed - specific.observed;
  const expected = broad.expected - specific.expected;
  if (observed < 0 || expected < -1e-9) return null; // not nested in the data: the rule does not apply
  if (expected <= 1e-9) return observed > 0;
  return ratioOf(observed, expected).lower > 1;
}

/**
 * The cluster finder's pure core. For each cell with E > 0: ratio O/E with exact Garwood limits, one-sided
 * exact Poisson p = P(X ≥ O | E) (excess only) and Benjamini–Hochberg q over all tested cells. Cells with
 * q < `qThreshold` (default 0.05) and at least `minObserved` failures (default 3) are significant; then, for every pair of significant cells A ⊋ B
 * ({@link containsCell}):
 *
 * 1. "no-extra-signal": the more specific B is dropped when its ratio's lower limit is not above A's ratio
 *    (L_B ≤ O_A/E_A): narrowing to B adds nothing the broader cell does not already show.
 * 2. "explained-by-contained-cell": the broader A is dropped when B does add signal (L_B > O_A/E_A) and the
 *    remainder A∖B (O_A − O_B failures where E_A − E_B were expected) shows no excess, i.e. its exact lower
 *    limit is ≤ 1: A is significant only because it contains B. (Skipped if the counts are not nested.)
 *
 * Kept cells are ranked by p ascending, then by excess O − E descending, and described in one sentence
 * ({@link describeCell}). Association only: a signal is a place to look, not a cause.
 */
export function scanClusters(cells: readonly ScanCell[], options: ClusterScanOptions): ClusterScanResult {
  const qThreshold = options.qThreshold ?? 0.05;
  const level = options.level ?? 0.95;
  cells.forEach(validateCell);
  const testable = cells.filter((c) => c.expected > 0);
  const untested = cells.filter((c) => !(c.expected > 0));
  const pValues = testable.map((c) => poissonExcessPValue(c.observed, c.expected));
  // the Garwood limits depend on the count alone: one interval per distinct count (a large scan tests ~10⁵ cells)
  const intervals = new Map<number, { lower: number; upper: number }>();
  const ratioOf = (observed: number, expected: number): StandardisedRatio => {
    let i = intervals.get(observed);
    if (!i) intervals.set(observed, (i = poissonExactInterval(observed, level)));
    return { observed, expected, ratio: observed / expected, lower: i.lower / expected, upper: i.upper / expected, level };
  };
  const { adjusted } = benjaminiHochberg(pValues);
  const tested: ScannedCell[] = testable.map((c, i) => ({
    ...c,
    ratio: ratioOf(c.observed, c.expected),
    pValue: pValues[i],
    qValue: adjusted[i],
  }));
  const byRank = (a: ScannedCell, b: ScannedCell): number =>
    a.pValue - b.pValue || b.observed - b.expected - (a.observed - a.expected);
  const minObserved = options.minObserved ?? 3;
  const significant = tested.filter((c) => c.qValue < qThreshold && c.observed >= minObserved).sort(byRank);

  const dropped = new Map<ScannedCell, DroppedCell>();
  const within = containedIn(significant);
  for (const broad of significant) {
    for (const specific of within(broad)) {
      if (specific.ratio.lower <= broad.ratio.ratio) {
        if (!dropped.has(specific)) dropped.set(specific, { cell: specific, reason: "no-extra-signal", by: broad.dimensions });
      } else if (!dropped.has(broad) && remainderHasExcess(broad, specific, ratioOf) === false) {
        dropped.set(broad, { cell: broad, reason: "explained-by-contained-cell", by: specific.dimensions });
      }
    }
  }
  const kept = significant.filter((c) => !dropped.has(c));
  const droppedList = [...dropped.values()];
  const absorbedBy = new Map<CellDimensions, CellDimensions[]>();
  for (const d of droppedList) {
    const list = absorbedBy.get(d.by);
    if (list) list.push(d.cell.dimensions);
    else absorbedBy.set(d.by, [d.cell.dimensions]);
  }
  const signals: ClusterSignal[] = kept.map((c, i) => ({
    ...c,
    rank: i + 1,
    description: describeCell(c, options.subject, options.labels),
    absorbed: absorbedBy.get(c.dimensions) ?? [],
  }));
  return { tested, untested, signals, dropped: droppedList, qThreshold, level };
}

/**
 * For each cell of `cells`, the cells of the same list it contains ({@link containsCell}), in list order.
 * Cells are indexed once under each of the 2⁶ generalisations of their scalar dimensions, so a broad cell
 * finds its candidates by one look-up instead of a pass over every cell (the scan's significant cells
 * number in the thousands on a large warehouse); build windows are then compared as month numbers.
 */
export function containedIn<C extends ScanCell>(cells: readonly C[]): (broad: C) => C[] {
  const months = new Map<C, [number, number] | null>();
  const buckets = new Map<string, C[]>();
  const keyOf = (d: CellDimensions, mask: number) =>
    `${mask}\u0001${SCALAR_DIMENSIONS.map((k, i) => (mask & (1 << i) ? ALL : valueOf(d, k))).join("\u0001")}`;
  for (const c of cells) {
    const b = c.dimensions.build;
    months.set(c, b === ALL ? null : [monthIndex(b.from), monthIndex(b.to)]);
    for (let mask = 0; mask < 1 << SCALAR_DIMENSIONS.length; mask++) {
      const k = keyOf(c.dimensions, mask);
      const list = buckets.get(k);
      if (list) list.push(c);
      else buckets.set(k, [c]);
    }
  }
  return (broad) => {
    const mask = SCALAR_DIMENSIONS.reduce((m, k, i) => (valueOf(broad.dimensions, k) === ALL ? m | (1 << i) : m), 0);
    const wide = months.get(broad) ?? (broad.dimensions.build === ALL ? null : [monthIndex(broad.dimensions.build.from), monthIndex(broad.dimensions.build.to)]);
    return (buckets.get(keyOf(broad.dimensions, mask)) ?? []).filter((s) => {
      const narrow = months.get(s)!;
      if (wide === null) return narrow !== null || !sameDimensions(broad.dimensions, s.dimensions);
      if (narrow === null) return false;
      if (wide[0] === narrow[0] && wide[1] === narrow[1]) return !sameDimensions(broad.dimensions, s.dimensions);
      return wide[0] <= narrow[0] && narrow[1] <= wide[1];
    });
  };
}

/**
 * Merges cells that differ only in build month and whose months are consecutive into one cell per run, with a
 * build window (e.g. Sep, Oct, Nov, Dec 2021 → "Sep–Dec 2021"): observed and expected are summed and the
 * repair-line ids joined (duplicates removed). Runs break at a missing month. Cells with build ALL pass
 * through unchanged. Pass only the cells you want merged (e.g. the significant single-month cells of a scan)
 * and scan the result again, since merged cells need their own p and q.
 */
export function collapseBuildWindows(cells: readonly ScanCell[]): ScanCell[] {
  const out: ScanCell[] = [];
  const groups = new Map<string, ScanCell[]>();
  for (const cell of cells) {
    if (cell.dimensions.build === ALL) {
      out.push(cell);
      continue;
    }
    const key = JSON.stringify(SCALAR_DIMENSIONS.map((d) => valueOf(cell.dimensions, d)));
    const group = groups.get(key);
    if (group) group.push(cell);
    else groups.set(key, [cell]);
  }
  const from = (c: ScanCell): number => monthIndex((c.dimensions.build as MonthRange).from);
  const to = (c: ScanCell): number => monthIndex((c.dimensions.build as MonthRange).to);
  for (const group of groups.values()) {
    group.sort((a, b) => from(a) - from(b));
    let run: ScanCell = group[0];
    for (const next of group.slice(1)) {
      if (from(next) === to(run) + 1) {
        run = {
          dimensions: { ...run.dimensions, build: { from: (run.dimensions.build as MonthRange).from, to: (next.dimensions.build as MonthRange).to } },
          observed: run.observed + next.observed,
          expected: run.expected + next.expected,
          repairLineIds: [...new Set([...run.repairLineIds, ...next.repairLineIds])],
        };
      } else {
        out.push(run);
        run = next;
      }
    }
    out.push(run);
  }
  return out;
}
