import { createHash } from "node:crypto";
import type { Db } from "../db/database.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import { analyticsFiltersSchema, type AnalyticsFilters } from "../../shared/schemas/analytics-filters.js";
import { clusterQuerySchema, type Cluster, type ClusterQuery, type Finding } from "../../shared/schemas/analytics-clusters.js";
import { ALL, describeCell, type DimensionLabels } from "../analytics/cluster-scan.js";
import { facetWords, findingSentence, groupFindings } from "../analytics/findings.js";
import { findingKey } from "../../shared/finding-key.js";
import { hourBandLabel, temperatureBandLabel } from "../../shared/bands.js";
import { scanCells } from "../db/queries/analytics-clusters.js";
import type { ClusterSignal } from "../analytics/cluster-scan.js";
import { scanOnWorker } from "./cluster-scan/scan-pool.js";
import type { ScanSummary } from "./cluster-scan/scan-task.js";
import { ResultCache } from "./result-cache.js";
import { dataVersion } from "../db/queries/data-version.js";
import { components } from "../../shared/catalog.js";

export const clusterMethod = (standardise: "hour" | "hour+temperature", level: "component" | "system" = "component") =>
  (level === "component"
    ? "Each part is scanned on its own: a cell counts the failures of one part, and a supplier lot is charged only with failures of the part it supplied (the heater-plug lot with heater-plug failures). "
    : "The parts are scanned together; the supplier-lot dimension applies only when the heater plug is the one part scanned. ") +
  (standardise === "hour+temperature"
    ? "Expected failures from the part's own rates per engine hour in each hour band × temperature band of the scanned group (indirect standardisation), so cold weather alone is not a cluster; one-sided exact Poisson p-value per cell, Benjamini–Hochberg q over the cells of each part."
    : "Expected failures from the part's own rates per engine hour in each hour band of the scanned group (indirect standardisation); one-sided exact Poisson p-value per cell, Benjamini–Hochberg q over the cells of each part.") +
  " Signals that describe the same failures are grouped into one finding, the narrower ones shown as its facets.";

export const clusterCaution =
  "A cluster is an association in the data, a place to look: confirm it against the repair lines and the parts before acting on it.";

export const COLD_START_AIDS = components.filter((c) => c.coldStartAid).map((c) => c.code);

function subjectFor(codes: string[]): string {
  if (codes.length === COLD_START_AIDS.length && codes.every((c) => COLD_START_AIDS.includes(c))) return "Cold-start aids";
  return codes.map((c) => components.find((x) => x.code === c)?.name ?? c).join(" / ");
}

/** A stable id for a cluster: a hash of its dimensions and the components scanned. */
export const clusterId = (components: string[], dims: unknown) =>
  createHash("sha256").update(JSON.stringify([components, dims])).digest("hex").slice(0, 16);

export interface ClusterFinding {
  components: string[];
  filters: AnalyticsFilters;
  query: ClusterQuery;
  scan: ScanSummary;
}

// one cache per database handle, so apps over different databases never share results
const caches = new WeakMap<Db, ResultCache<ScanSummary>>();

/**
 * The cluster scan for a caller's scope and the query-string parameters (cluster options plus the shared
 * analytics filters), cached per data version. The list, detail and overview routes all go through here.
 * The scan cuts temperature by the bands of the query's unit (`unit`, part of the filters and so of the
 * cache key: each unit's scan is kept apart).
 */
export async function findClusters(db: Db, scope: ShopScope, raw: Record<string, unknown>): Promise<ClusterFinding> {
  const query = clusterQuerySchema.parse(raw);
  const comps = query.components ?? COLD_START_AIDS;
  const filters = analyticsFiltersSchema.parse({ ...raw, components: comps.join(",") });
  let cache = caches.get(db);
  if (!cache) caches.set(db, (cache = new ResultCache<ScanSummary>(50)));
  const key = JSON.stringify([scope, filters, query.standardise, query.q, query.level]);
  const scan = await cache.get(key, await dataVersion(db), async () => {
    const rows = await scanCells(db, scope, filters, query.level);
    // the CPU-bound part on a worker thread, so other requests are answered meanwhile
    return scanOnWorker({ rows, standardise: query.standardise, subject: subjectFor(comps), qThreshold: query.q });
  });
  return { components: comps, filters, query, scan };
}

type Unit = "C" | "F";
const partName = (code: string) => components.find((c) => c.code === code)?.name ?? code;
/** How the words of a scan name parts and bands, in the caller's temperature unit. */
const labelsIn = (unit: Unit): DimensionLabels => ({ component: partName, temperatureBand: (id) => temperatureBandLabel(id, unit), hourBand: hourBandLabel });

/** A ranked signal as the API shows it, its sentence in the caller's temperature unit. */
export const toCluster = (comps: string[], s: ClusterSignal, unit: Unit = "C"): Cluster => ({
  id: clusterId(comps, s.dimensions),
  rank: s.rank,
  description: describeCell(s, subjectFor(comps), labelsIn(unit)),
  dimensions: s.dimensions,
  observed: s.observed,
  expected: s.expected,
  ratio: s.ratio.ratio,
  lower: s.ratio.lower,
  upper: s.ratio.upper,
  pValue: s.pValue,
  qValue: s.qValue,
  repairLineIds: [...s.repairLineIds],
  absorbed: s.absorbed.length,
});

/** Worked out once per scan and unit (ids are hashes; lists are long). */
function perScan<T>(store: WeakMap<ScanSummary, Map<Unit, T>>, scan: ScanSummary, unit: Unit, make: () => T): T {
  let byUnit = store.get(scan);
  if (!byUnit) store.set(scan, (byUnit = new Map()));
  let v = byUnit.get(unit);
  if (v === undefined) byUnit.set(unit, (v = make()));
  return v;
}
const listed = new WeakMap<ScanSummary, Map<Unit, Cluster[]>>();
const grouped = new WeakMap<ScanSummary, Map<Unit, Finding[]>>();

type Found = Pick<ClusterFinding, "components" | "scan"> & { query: Pick<ClusterQuery, "standardise" | "unit"> };

/** The scan's signals as findings (one per underlying signal, server/analytics/findings.ts), in the query's temperature unit. */
export function findingsOf(found: Found): Finding[] {
  const unit = found.query.unit;
  return perScan(grouped, found.scan, unit, () => {
    const byDims = new Map(found.scan.signals.map((s, i) => [s, clustersOf(found)[i]]));
    const labels = labelsIn(unit);
    const subject = subjectFor(found.components);
    return groupFindings(found.scan.signals).map((f) => {
      const part = f.lead.dimensions.component && f.lead.dimensions.component !== ALL ? f.lead.dimensions.component : null;
      return {
        id: byDims.get(f.lead)!.id,
        key: findingKey(f.lead.dimensions),
        rank: f.rank,
        part,
        partName: part ? partName(part) : subject,
        sentence: findingSentence(f, { partName, subject, standardise: found.query.standardise, labels }),
        life: null, // filled for the findings shown (services/finding-life.ts): a fit per finding is too dear for every one
        lead: byDims.get(f.lead)!,
        facets: f.facets.map((x, i) => ({ cluster: byDims.get(x)!, kind: f.facetKinds[i], words: facetWords(f.lead.dimensions, x.dimensions, labels) })),
        cells: f.cells,
      };
    });
  });
}

/** Every signal of a scan as the API shows it, in the query's temperature unit (default °C). */
export function clustersOf(found: Pick<ClusterFinding, "components" | "scan"> & { query?: Pick<ClusterQuery, "unit"> }): Cluster[] {
  const unit = found.query?.unit ?? "C";
  return perScan(listed, found.scan, unit, () => found.scan.signals.map((s) => toCluster(found.components, s, unit)));
}
