import { Router } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";
import { clusterCaution, clusterMethod, findClusters, toCluster } from "../services/cluster-finder.js";
import { analyticsRoles } from "../../shared/roles.js";


export function analyticsClusterRoutes(db: Db): Router {
  const router = Router();
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const { components: comps, query: q, scan } = await findClusters(db, requireScope(req), req.query);
    const body: ClusterList = {
      components: comps,
      method: clusterMethod(q.standardise),
      caution: clusterCaution,
      cellsTested: scan.cellsTested,
      qThreshold: scan.qThreshold,
      clusters: scan.signals.slice(0, q.limit).map((s) => toCluster(comps, s)),
    };
    res.json(body);
  });
  return router;
}
