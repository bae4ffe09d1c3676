import { Router } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";
import { clusterCaution, clusterMethod, clustersOf, findClusters } from "../services/cluster-finder.js";
import { analyticsRoles } from "../../shared/roles.js";
import { AnswerCache, LARGE_ANSWERS } from "../services/answer-cache.js";

/** GET /api/analytics/clusters: the ranked clusters of the scan for the caller's scope and filters, kept per load. */
export function analyticsClusterRoutes(db: Db): Router {
  const router = Router();
  const answers = new AnswerCache(db, 50, LARGE_ANSWERS);
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const scope = requireScope(req);
    await answers.send(req, res, scope, async () => {
      const found = await findClusters(db, scope, req.query);
      const { components: comps, query: q, scan } = found;
      const body: ClusterList = {
        components: comps,
        method: clusterMethod(q.standardise),
        caution: clusterCaution,
        cellsTested: scan.cellsTested,
        qThreshold: scan.qThreshold,
        clusters: clustersOf(found).slice(0, q.limit),
      };
      return body;
    });
  });
  return router;
}
