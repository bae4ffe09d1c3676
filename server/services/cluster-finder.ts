import { createHash } from "node:crypto";
import type { Db } from "../db/database.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import { analyticsFiltersSchema, type AnalyticsFilters } from "../../shared/schemas/analytics-filters.js";
import { clusterQuerySchema, type Cluster, type ClusterQuery } from "../../shared/schemas/analytics-clusters.js";
import { scanCells } from "../db/queries/analytics-clusters.js";
import type { ClusterSignal } from "../analytics/cluster-scan.js";
import { scanOnWorker } from "./cluster-scan/scan-pool.js";
import type { ScanSummary } from "./cluster-scan/scan-task.js";
import { ResultCache } from "./result-cache.js";
import { dataVersion } from "../db/queries/data-version.js";
import { components } from "../../shared/catalog.js";

export const clusterMethod = (standardise: "hour" | "hour+temperature") =>
  standardise === "hour+temperature"
    ? "Expected failures from the scanned group's own rates per engine hour in each hour band × temperature band (indirect standardisation), so cold weather alone is not a cluster; one-sided exact Poisson p-value per cell, Benjamini–Hochberg q over all cells tested."
    : "Expected failures from the scanned group's own rates per engine hour in each hour band (indirect standardisation); one-sided exact Poisson p-value per cell, Benjamini–Hochberg q over all cells tested.";

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
 */
export async function findClusters(db: Db, scope: ShopScope, raw: Record<string, unknown>): Promise<ClusterFinding> {
  const query = clusterQuerySchema.parse(raw);
  const comps = query.components ?? COLD_START_AIDS;
  const filters = analyticsFiltersSchema.parse({ ...raw, components: comps.join(",") });
  let cache = caches.get(db);
  if (!cache) caches.set(db, (cache = new ResultCache<ScanSummary>(50)));
  const key = JSON.stringify([scope, filters, query.standardise, query.q]);
  const scan = await cache.get(key, await dataVersion(db), async () => {
    const rows = await scanCells(db, scope, filters);
    // the CPU-bound part on a worker thread, so other requests are answered meanwhile
    return scanOnWorker({ rows, standardise: query.standardise, subject: subjectFor(comps), qThreshold: query.q });
  });
  return { components: comps, filters, query, scan };
}

/** A ranked signal as the API shows it. */
export const toCluster = (comps: string[], s: ClusterSignal): Cluster => ({
  id: clusterId(comps, s.dimensions),
  rank: s.rank,
  description: s.description,
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

const listed = new WeakMap<ScanSummary, Cluster[]>();

/** Every signal of a scan as the API shows it, worked out once per scan (ids are hashes; lists are long). */
export function clustersOf(found: Pick<ClusterFinding, "components" | "scan">): Cluster[] {
  let list = listed.get(found.scan);
  if (!list) listed.set(found.scan, (list = found.scan.signals.map((s) => toCluster(found.components, s))));
  return list;
}
