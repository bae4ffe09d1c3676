import { ALL, collapseBuildWindows, type CellDimensions, type MonthRange, type ScanCell } from "./cluster-scan.js";

/** One finest-grain row of the scan cube, as aggregated in SQL. */
export interface CubeRow {
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
  dims: Record<Dim, string>;
  observed: number;
  expected: number;
  ids: string[];
  months: Set<string>;
  families: Set<string>;
}

/**
 * The cells of the cluster scan: every combination of fixed and free ("all") dimensions over the cube,
 * with observed failures and expected = Σ engine hours × reference rate of the row's stratum (indirect
 * standardisation). A cell whose exposure all lies in one engine family, or in a narrower run of build
 * months than the whole group, is described by that family and build window (the same data, said
 * precisely); cells that then coincide are kept once. Single build months that stand out are also
 * merged into consecutive build windows by {@link collapseBuildWindows}.
 */
export function buildScanCells(rows: readonly CubeRow[], by: Standardisation = "hour+temperature"): ScanCell[] {
  const rates = referenceRates(rows, by);
  const allMonths = [...new Set(rows.map((r) => r.buildMonth))].sort();
  const cells = new Map<string, Acc>();
  const subsets = 1 << DIMS.length;
  const FAMILY_BIT = 1 << DIMS.indexOf("engineFamily");
  const BUILD_BIT = 1 << DIMS.indexOf("build");
  for (const r of rows) {
    const expected = r.engineHours * (rates.get(stratum(r, by)) ?? 0);
    const values = DIMS.map((d) => rowValue(r, d));
    const counts = r.engineHours > 0 || r.failures > 0;
    for (let mask = 0; mask < subsets; mask++) {
      let key = "";
      for (let i = 0; i < values.length; i++) key += (mask & (1 << i) ? values[i] : ALL) + "\u0001";
      let a = cells.get(key);
      if (!a) {
        const dims = {} as Record<Dim, string>;
        DIMS.forEach((d, i) => (dims[d] = mask & (1 << i) ? values[i] : ALL));
        a = { dims, observed: 0, expected: 0, ids: [], months: new Set(), families: new Set() };
        cells.set(key, a);
      }
      a.observed += r.failures;
      a.expected += expected;
      if (r.repairLineIds.length) for (const id of r.repairLineIds) a.ids.push(id);
      if (counts) {
        if (!(mask & BUILD_BIT)) a.months.add(r.buildMonth);
        if (!(mask & FAMILY_BIT)) a.families.add(r.engineFamily);
      }
    }
  }
  const seen = new Set<string>();
  const out: ScanCell[] = [];
  const singleMonth: ScanCell[] = [];
  for (const a of cells.values()) {
    const d: CellDimensions = {
      engineFamily: a.dims.engineFamily,
      build: a.dims.build === ALL ? ALL : { from: a.dims.build, to: a.dims.build },
      supplierLot: a.dims.supplierLot,
      shop: a.dims.shop,
      temperatureBand: a.dims.temperatureBand,
      hourBand: a.dims.hourBand,
    };
    if (d.engineFamily === ALL && a.families.size === 1) d.engineFamily = [...a.families][0];
    if (d.build === ALL && a.months.size > 0) {
      const months = [...a.months].sort();
      const range: MonthRange = { from: months[0], to: months[months.length - 1] };
      const span = allMonths.indexOf(range.to) - allMonths.indexOf(range.from) + 1;
      if (span === months.length && months.length < allMonths.length) d.build = range;
    }
    const key = JSON.stringify(d);
    if (seen.has(key)) continue;
    seen.add(key);
    const cell: ScanCell = { dimensions: d, observed: a.observed, expected: a.expected, repairLineIds: a.ids };
    out.push(cell);
    if (a.dims.build !== ALL && cell.observed > cell.expected) singleMonth.push(cell);
  }
  for (const w of collapseBuildWindows(singleMonth)) {
    const b = w.dimensions.build;
    if (b === ALL || b.from === b.to) continue;
    const key = JSON.stringify(w.dimensions);
    if (seen.has(key)) continue;
    seen.add(key);
    out.push(w);
  }
  return out;
}
