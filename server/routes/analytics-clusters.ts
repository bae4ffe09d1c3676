import { Router } from "express";
import { allow, requireScope } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import type { ClusterList } from "../../shared/schemas/analytics-clusters.js";
import { clusterCaution, clusterMethod, clustersOf, findClusters, findingsOf } from "../services/cluster-finder.js";
import { analyticsRoles } from "../../shared/roles.js";
import { AnswerCache, LARGE_ANSWERS } from "../services/answer-cache.js";
import { recordFindings } from "../db/queries/findings.js";
import { dataVersion } from "../db/queries/data-version.js";
import { findingLifeWords } from "../services/finding-life.js";

/** GET /api/analytics/clusters: the ranked clusters of the scan for the caller's scope and filters, kept per load. */
export function analyticsClusterRoutes(db: Db): Router {
  const router = Router();
  const answers = new AnswerCache(db, 50, LARGE_ANSWERS);
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const scope = requireScope(req);
    await answers.send(req, res, scope, async () => {
      const found = await findClusters(db, scope, req.query);
      const { components: comps, query: q, scan } = found;
      const findings = findingsOf(found);
      // life in words for the lot findings shown (a Weibull fit per finding on the worker threads)
      const shown = await Promise.all(findings.slice(0, q.limit).map(async (f) => ({ ...f, life: await findingLifeWords(db, scope, f) })));
      // the group-wide scan at its defaults is the one whose figures findings are tracked by (once per data version);
      // in its default unit too: a scan in °F bands has other cells, and its figures would move the findings back and forth
      if (scope.kind === "all" && Object.keys(req.query).every((k) => k === "unit") && q.unit === "C") {
        await recordFindings(db, await dataVersion(db), findings.map((f) => ({ key: f.key, description: f.sentence, observed: f.lead.observed, expected: f.lead.expected, lower: f.lead.lower })));
      }
      const body: ClusterList = {
        components: comps,
        level: q.level,
        method: clusterMethod(q.standardise, q.level),
        caution: clusterCaution,
        cellsTested: scan.cellsTested,
        qThreshold: scan.qThreshold,
        findings: shown,
        clusters: clustersOf(found).slice(0, q.limit),
      };
      return body;
    });
  });
  return router;
}
