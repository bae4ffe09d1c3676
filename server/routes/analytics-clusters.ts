import { Router } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";
import { findClusters, toCluster } from "../services/cluster-finder.js";
import { ANALYTICS_ROLES } from "./analytics-rates.js";

export { COLD_START_AIDS, clusterId } from "../services/cluster-finder.js";

export const clusterMethod = (standardise: "hour" | "hour+temperature") =>
  standardise === "hour+temperature"
    ? "Expected failures from the scanned group's own rates per engine hour in each hour band × temperature band (indirect standardisation), so cold weather alone is not a cluster; one-sided exact Poisson p-value per cell, Benjamini–Hochberg q over all cells tested."
    : "Expected failures from the scanned group's own rates per engine hour in each hour band (indirect standardisation); one-sided exact Poisson p-value per cell, Benjamini–Hochberg q over all cells tested.";

export const clusterCaution =
  "A cluster is an association in the data, a place to look: confirm it against the repair lines and the parts before acting on it.";

export function analyticsClusterRoutes(db: Db): Router {
  const router = Router();
  router.get("/", allow(...ANALYTICS_ROLES), async (req, res) => {
    const { components: comps, query: q, scan } = await findClusters(db, requireScope(req), req.query);
    const body: ClusterList = {
      components: comps,
      method: clusterMethod(q.standardise),
      caution: clusterCaution,
      cellsTested: scan.tested.length,
      qThreshold: scan.qThreshold,
      clusters: scan.signals.slice(0, q.limit).map((s) => toCluster(comps, s)),
    };
    res.json(body);
  });
  return router;
}
