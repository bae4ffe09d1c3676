import { ALL, collapseBuildWindows, type CellDimensions, type MonthRange, type ScanCell } from "./cluster-scan.js";

/** One finest-grain row of the scan cube, as aggregated in SQL. */
export interface CubeRow {
  /** the part whose failures `failures` counts (a part-by-part scan); absent at the system level */
  component?: string;
  engineFamily: string;
  buildMonth: string; // YYYY-MM
  lot: string;
  shopCode: string;
  tempBand: string;
  hourBand: string;
  failures: number;
  engineHours: number;
  repairLineIds: readonly string[];
}

export type Standardisation = "hour" | "hour+temperature";

type Dim = "engineFamily" | "build" | "supplierLot" | "shop" | "temperatureBand" | "hourBand";
const DIMS: readonly Dim[] = ["engineFamily", "build", "supplierLot", "shop", "temperatureBand", "hourBand"];
const rowValue = (r: CubeRow, d: Dim): string =>
  d === "engineFamily" ? r.engineFamily : d === "build" ? r.buildMonth : d === "supplierLot" ? r.lot : d === "shop" ? r.shopCode : d === "temperatureBand" ? r.tempBand : r.hourBand;

/**
 * Reference rate per engine hour for each standardisation stratum (hour band, or hour band × temperature
 * band), from the whole scanned group: failures ÷ engine hours in the stratum.
 */
export function referenceRates(rows: readonly CubeRow[], by: Standardisation): Map<string, number> {
  const acc = new Map<string, { f: number; h: number }>();
  for (const r of rows) {
    const k = stratum(r, by);
    const a = acc.get(k) ?? { f: 0, h: 0 };
    a.f += r.failures;
    a.h += r.engineHours;
    acc.set(k, a);
  }
  return new Map([...acc].map(([k, a]) => [k, a.h > 0 ? a.f / a.h : 0]));
}
const stratum = (r: CubeRow, by: Standardisation) => (by === "hour" ? r.hourBand : `${r.hourBand}|${r.tempBand}`);

interface Acc {
  /** value index per dimension, −1 = ALL */
  idx: Int32Array;
  observed: number;
  expected: number;
  ids: string[];
  /** bitset over build-month indices and over engine-family indices, of rows with exposure or failures */
  months: Uint32Array;
  families: number;
}

const cellKey = (d: CellDimensions): string =>
  [d.engineFamily, d.build === ALL ? ALL : `${d.build.from}~${d.build.to}`, d.supplierLot, d.shop, d.temperatureBand, d.hourBand].join("\u0001");

/** Value dictionaries per dimension, so a cell key is one integer (mixed radix, ALL = 0). */
function dictionaries(rows: readonly CubeRow[]) {
  return DIMS.map((d) => {
    const values = [...new Set(rows.map((r) => rowValue(r, d)))].sort();
    return { values, index: new Map(values.map((v, i) => [v, i])) };
  });
}

/**
 * The cells of the cluster scan: every combination of fixed and free ("all") dimensions over the cube,
 * with observed failures and expected = Σ engine hours × reference rate of the row's stratum (indirect
 * standardisation). A cell whose exposure all lies in one engine family, or in a narrower run of build
 * months than the whole group, is described by that family and build window (the same data, said
 * precisely); cells that then coincide are kept once. Single build months that stand out are also
 * merged into consecutive build windows by {@link collapseBuildWindows}.
 */
export function buildScanCells(
  rows: readonly CubeRow[],
  by: Standardisation = "hour+temperature",
  { withIds = true }: { withIds?: boolean } = {},
): ScanCell[] {
  const rates = referenceRates(rows, by);
  const dicts = dictionaries(rows);
  const radix = dicts.map((d) => d.values.length + 1);
  const BUILD = DIMS.indexOf("build");
  const FAMILY = DIMS.indexOf("engineFamily");
  const allMonths = dicts[BUILD].values; // sorted YYYY-MM
  const words = Math.ceil(allMonths.length / 32) || 1;
  if (dicts[FAMILY].values.length > 30) throw new RangeError("more than 30 engine families in one scan");
  const cells = new Map<number, Acc>();
  const subsets = 1 << DIMS.length;
  const rowIdx = new Int32Array(DIMS.length);
  for (const r of rows) {
    const expected = r.engineHours * (rates.get(stratum(r, by)) ?? 0);
    DIMS.forEach((d, i) => (rowIdx[i] = dicts[i].index.get(rowValue(r, d))!));
    const counts = r.engineHours > 0 || r.failures > 0;
    const month = rowIdx[BUILD];
    const familyBit = 1 << rowIdx[FAMILY];
    for (let mask = 0; mask < subsets; mask++) {
      let key = 0;
      for (let i = 0; i < DIMS.length; i++) key = key * radix[i] + (mask & (1 << i) ? rowIdx[i] + 1 : 0);
      let a = cells.get(key);
      if (!a) {
        const idx = new Int32Array(DIMS.length);
        for (let i = 0; i < DIMS.length; i++) idx[i] = mask & (1 << i) ? rowIdx[i] : -1;
        a = { idx, observed: 0, expected: 0, ids: [], months: new Uint32Array(words), families: 0 };
        cells.set(key, a);
      }
      a.observed += r.failures;
      a.expected += expected;
      if (withIds && r.repairLineIds.length) for (const id of r.repairLineIds) a.ids.push(id);
      if (counts) {
        a.months[month >>> 5] |= 1 << (month & 31);
        a.families |= familyBit;
      }
    }
  }
  const value = (a: Acc, i: number) => (a.idx[i] < 0 ? ALL : dicts[i].values[a.idx[i]]);
  const seen = new Set<string>();
  const out: ScanCell[] = [];
  const singleMonth: ScanCell[] = [];
  for (const a of cells.values()) {
    const d: CellDimensions = {
      engineFamily: value(a, FAMILY),
      build: a.idx[BUILD] < 0 ? ALL : { from: value(a, BUILD), to: value(a, BUILD) },
      supplierLot: value(a, DIMS.indexOf("supplierLot")),
      shop: value(a, DIMS.indexOf("shop")),
      temperatureBand: value(a, DIMS.indexOf("temperatureBand")),
      hourBand: value(a, DIMS.indexOf("hourBand")),
    };
    if (d.engineFamily === ALL && a.families !== 0 && (a.families & (a.families - 1)) === 0) {
      d.engineFamily = dicts[FAMILY].values[31 - Math.clz32(a.families)];
    }
    if (d.build === ALL) {
      const present: number[] = [];
      for (let m = 0; m < allMonths.length; m++) if (a.months[m >>> 5] & (1 << (m & 31))) present.push(m);
      if (present.length > 0 && present.length < allMonths.length && present[present.length - 1] - present[0] + 1 === present.length) {
        d.build = { from: allMonths[present[0]], to: allMonths[present[present.length - 1]] };
      }
    }
    const key = cellKey(d);
    if (seen.has(key)) continue;
    seen.add(key);
    const cell: ScanCell = { dimensions: d, observed: a.observed, expected: a.expected, repairLineIds: a.ids };
    out.push(cell);
    if (a.idx[BUILD] >= 0 && cell.observed > cell.expected) singleMonth.push(cell);
  }
  for (const w of collapseBuildWindows(singleMonth)) {
    const b = w.dimensions.build;
    if (b === ALL || b.from === b.to) continue;
    const key = cellKey(w.dimensions);
    if (seen.has(key)) continue;
    seen.add(key);
    out.push(w);
  }
  return out;
}

/**
 * The repair lines of the cube rows that fall in a cell (every fixed dimension equal, the build month inside
 * the window), in cube order. Lets a scan build its cells without carrying every failure's key through every
 * one of them, and name the lines of the few cells it keeps afterwards.
 */
export function failureIdsIn(rows: readonly CubeRow[], d: CellDimensions): string[] {
  const out: string[] = [];
  const b = d.build;
  for (const r of rows) {
    if (!r.repairLineIds.length) continue;
    if (d.component !== undefined && d.component !== ALL && d.component !== r.component) continue;
    if (d.engineFamily !== ALL && d.engineFamily !== r.engineFamily) continue;
    if (d.supplierLot !== ALL && d.supplierLot !== r.lot) continue;
    if (d.shop !== ALL && d.shop !== r.shopCode) continue;
    if (d.temperatureBand !== ALL && d.temperatureBand !== r.tempBand) continue;
    if (d.hourBand !== ALL && d.hourBand !== r.hourBand) continue;
    if (b !== ALL && (r.buildMonth < b.from || r.buildMonth > b.to)) continue;
    for (const id of r.repairLineIds) out.push(id);
  }
  return out;
}

/**
 * The cells of a part-by-part scan: the cube's rows grouped by part, each group's cells built on its own
 * ({@link buildScanCells}: expected failures from that part's own rates per stratum) and labelled with the
 * part, so a cell counts the failures of one part only and cells of different parts never contain each other.
 * Tested together afterwards, the false-discovery control spans every part's cells.
 */
export function buildPartCells(
  rows: readonly CubeRow[],
  by: Standardisation = "hour+temperature",
  opts: { withIds?: boolean } = {},
): ScanCell[] {
  const byPart = new Map<string, CubeRow[]>();
  for (const r of rows) {
    const k = r.component ?? ALL;
    const list = byPart.get(k);
    if (list) list.push(r);
    else byPart.set(k, [r]);
  }
  const out: ScanCell[] = [];
  for (const [component, group] of [...byPart].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
    for (const c of buildScanCells(group, by, opts)) out.push({ ...c, dimensions: { component, ...c.dimensions } });
  }
  return out;
}
