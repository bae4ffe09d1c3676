import { Router } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { HttpError } from "../errors.js";
import type { ClusterDetail } from "../../shared/schemas/analytics-clusters.js";
import { hourBands, temperatureBandsIn } from "../../shared/bands.js";
import { clusterCaution, clusterMethod, clustersOf, findClusters } from "../services/cluster-finder.js";
import { clusterLineFacts, failureBandCounts } from "../db/queries/cluster-detail.js";
import { listRepairs } from "../db/queries/repairs.js";
import { analyticsRoles } from "../../shared/roles.js";
import type { ShopScope } from "../../shared/schemas/me.js";
import { AnswerCache, LARGE_ANSWERS } from "../services/answer-cache.js";

/** Counts per band in the bands' order (unknown last), the cluster's beside everyone else's. */
function profile(ids: readonly string[], inCluster: Map<string, number>, all: Map<string, number>): ClusterDetail["hourProfile"] {
  const bands = [...ids, ...[...all.keys()].filter((b) => !ids.includes(b))];
  return bands.map((band) => {
    const mine = inCluster.get(band) ?? 0;
    return { band, inCluster: mine, elsewhere: Math.max(0, (all.get(band) ?? 0) - mine) };
  });
}

const tally = <T,>(items: T[], key: (t: T) => string, n: (t: T) => number = () => 1) => {
  const m = new Map<string, number>();
  for (const i of items) m.set(key(i), (m.get(key(i)) ?? 0) + n(i));
  return m;
};

/**
 * GET /api/analytics/clusters/:id: one cluster of the scan the list shows (same query parameters), with its
 * repair lines, machines, failures by month and its temperature and hour profile. Each answer is kept per
 * request until the next load (the background profile reads every failure line the filters select).
 */
export function clusterDetailRoutes(db: Db): Router {
  const router = Router();
  const answers = new AnswerCache(db, 100, LARGE_ANSWERS);
  router.get("/:id", allow(...analyticsRoles), async (req, res) => {
    const scope = requireScope(req);
    await answers.send(req, res, scope, () => clusterDetail(db, scope, String(req.params.id), req.query));
  });
  return router;
}

async function clusterDetail(db: Db, scope: ShopScope, id: string, query: Record<string, unknown>): Promise<ClusterDetail> {
  const found = await findClusters(db, scope, query);
  const cluster = clustersOf(found).find((c) => c.id === id);
  if (!cluster) {
    throw new HttpError(404, "cluster_not_found", "That cluster is not in the current scan: the data, the filters or your shops may have changed. Open the cluster list again.");
  }
  const ids = cluster.repairLineIds;
  const [facts, background, lines] = await Promise.all([
    clusterLineFacts(db, scope, found.filters, ids),
    failureBandCounts(db, scope, found.filters),
    listRepairs(db, scope, { filters: { ...found.filters, components: [], from: undefined, to: undefined }, list: {}, ids }, { page: 1, pageSize: Math.max(ids.length, 1), sort: "opened", dir: "asc" }),
  ]);
  const machines = new Map<string, ClusterDetail["machines"][number]>();
  for (const f of facts) {
    const m = machines.get(f.serial);
    if (m) {
      m.failures += 1;
      m.lastFailure = f.openedDate;
    } else {
      machines.set(f.serial, {
        serial: f.serial, modelLine: f.modelLine, engineFamily: f.engineFamily, homeShop: f.homeShop, buildDate: f.buildDate, lot: f.lot,
        failures: 1, firstFailure: f.openedDate, lastFailure: f.openedDate,
      });
    }
  }
  return {
    cluster,
    components: found.components,
    method: clusterMethod(found.query.standardise, found.query.level),
    caution: clusterCaution,
    lines: lines.rows,
    machines: [...machines.values()].sort((a, b) => b.failures - a.failures || a.serial.localeCompare(b.serial)),
    timeline: [...tally(facts, (f) => f.month)].sort(([a], [b]) => a.localeCompare(b)).map(([month, failures]) => ({ month, failures })),
    temperatureProfile: profile(temperatureBandsIn(found.filters.unit).map((b) => b.id), tally(facts, (f) => f.tempBand), tally(background, (b) => b.tempBand, (b) => b.failures)),
    hourProfile: profile(hourBands.map((b) => b.id), tally(facts, (f) => f.hourBand), tally(background, (b) => b.hourBand, (b) => b.failures)),
  };
}
