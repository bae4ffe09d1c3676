import { Router } from "express";
import { allow, requireScope, requireUser } from "../auth/require-user.js";
import type { Db } from "../db/database.js";
import { NEW_CLUSTERS_SHOWN, type Overview } from "../../shared/schemas/overview.js";
import { recordVisit, type LoadRow } from "../db/queries/overview.js";
import { listShops } from "../db/queries/shops.js";
import { clustersOf, findClusters } from "../services/cluster-finder.js";
import { overviewSummary } from "../services/overview-summary.js";
import { AnswerCache } from "../services/answer-cache.js";
import { analyticsRoles } from "../../shared/roles.js";

export const ATTENTION_DEFINITION =
  "Over the 365 days up to the latest repair order: one point per failure visit, two more per comeback (a visit for the same component within 30 days and 100 engine hours of the previous one's close) and three more per component with three or more visits (a repeat repair). Highest score first.";

function loadsByShop(rows: LoadRow[], names: Map<string, string>): Overview["loads"] {
  const groups = new Map<string | null, LoadRow[]>();
  for (const r of rows) groups.set(r.shopCode, [...(groups.get(r.shopCode) ?? []), r]);
  return [...groups]
    .sort(([a], [b]) => (a === null ? 1 : b === null ? -1 : a.localeCompare(b)))
    .map(([shopCode, files]) => {
      const finished = files.map((f) => f.finishedAt?.getTime() ?? 0).filter(Boolean);
      return {
        shopCode,
        shopName: shopCode === null ? "Group-wide files" : (names.get(shopCode) ?? shopCode),
        lastFinishedAt: finished.length ? new Date(Math.max(...finished)).toISOString() : null,
        rowsRead: files.reduce((s, f) => s + f.rowsRead, 0),
        rowsRejected: files.reduce((s, f) => s + f.rowsRejected, 0),
        files: files.map((f) => ({ ...f, finishedAt: f.finishedAt?.toISOString() ?? null })),
      };
    });
}

/**
 * GET /api/overview: what changed since the last load and the last visit. The warehouse summary is kept
 * per shop scope until the next load (the cluster scan is kept by the cluster finder); the visit is
 * recorded on every request.
 */
export function overviewRoutes(db: Db): Router {
  const router = Router();
  const summaries = new AnswerCache(db, 50);
  router.get("/", allow(...analyticsRoles), async (req, res) => {
    const scope = requireScope(req);
    const user = requireUser(req);
    const [{ loads, headlines, attention }, shops, found] = await Promise.all([
      summaries.get(scope, () => overviewSummary(db, scope)),
      listShops(db, scope),
      findClusters(db, scope, {}),
    ]);
    const clusters = clustersOf(found);
    const visit = await recordVisit(db, user.sub, clusters.map((c) => c.id));
    const seen = new Set(visit.previousClusterIds ?? []);
    const fresh = clusters.filter((c) => !seen.has(c.id));
    const body: Overview = {
      loads: loadsByShop(loads, new Map(shops.map((s) => [s.code, s.name]))),
      headlines,
      clusters: {
        firstVisit: visit.previousClusterIds === null,
        previousVisitAt: visit.previousVisitAt?.toISOString() ?? null,
        total: clusters.length,
        newCount: fresh.length,
        newSinceLastVisit: fresh.slice(0, NEW_CLUSTERS_SHOWN).map(({ repairLineIds: _ids, ...c }) => c),
      },
      attention: { windowEnd: attention.windowEnd, definition: ATTENTION_DEFINITION, machines: attention.rows },
    };
    res.json(body);
  });
  return router;
}
